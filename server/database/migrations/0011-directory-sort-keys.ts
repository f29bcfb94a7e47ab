import type { MigrationFn } from '../migrator'

/**
 * The member directory sorts by the account's name or e-mail, which live on `users`, while the club
 * filter lives on `memberships`: every page had to join and sort the whole club (about 45 ms for
 * page 200 of 10 000 members). Each membership now carries a copy of the two sort keys — lower-cased,
 * in byte order (`COLLATE "C"`, the order the C.UTF-8 database already gave) — kept by triggers, so
 * a page is read from a (club_id, key, id) index however deep it is (about 1.3 ms).
 *
 * The copies are never written by the application: a membership takes them from its account when it
 * is inserted (or moved to another account), and a change of an account's name or e-mail rewrites
 * them in the same statement. Lock order stays as documented: the user row first, then its memberships
 * — only the name/e-mail edit fires it, and that edit has already locked the membership.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE memberships ADD COLUMN name_key text COLLATE "C", ADD COLUMN email_key text COLLATE "C";
    UPDATE memberships m SET name_key = lower(u.name), email_key = lower(u.email) FROM users u WHERE u.id = m.user_id;
    ALTER TABLE memberships ALTER COLUMN name_key SET NOT NULL, ALTER COLUMN email_key SET NOT NULL;

    CREATE FUNCTION memberships_take_sort_keys() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      SELECT lower(u.name), lower(u.email) INTO NEW.name_key, NEW.email_key FROM users u WHERE u.id = NEW.user_id;
      RETURN NEW;
    END $$;
    CREATE TRIGGER memberships_take_sort_keys BEFORE INSERT OR UPDATE OF user_id, name_key, email_key ON memberships
      FOR EACH ROW EXECUTE FUNCTION memberships_take_sort_keys();

    CREATE FUNCTION users_give_sort_keys() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      UPDATE memberships SET name_key = lower(NEW.name), email_key = lower(NEW.email) WHERE user_id = NEW.id;
      RETURN NULL;
    END $$;
    CREATE TRIGGER users_give_sort_keys AFTER UPDATE OF name, email ON users
      FOR EACH ROW WHEN (OLD.name IS DISTINCT FROM NEW.name OR OLD.email IS DISTINCT FROM NEW.email)
      EXECUTE FUNCTION users_give_sort_keys();

    CREATE INDEX memberships_club_name_key_idx ON memberships (club_id, name_key, id);
    CREATE INDEX memberships_club_email_key_idx ON memberships (club_id, email_key, id);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TRIGGER IF EXISTS users_give_sort_keys ON users;
    DROP FUNCTION IF EXISTS users_give_sort_keys();
    DROP TRIGGER IF EXISTS memberships_take_sort_keys ON memberships;
    DROP FUNCTION IF EXISTS memberships_take_sort_keys();
    ALTER TABLE memberships DROP COLUMN IF EXISTS name_key, DROP COLUMN IF EXISTS email_key;
  `)
}
