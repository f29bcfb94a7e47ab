// Erasure on request, the database part: a list of steps in plain SQL, with no Nuxt auto-import, so
// the server (services/club-data) and the command line (a restore, through jiti) run the same steps.
// The payment service's customer record is the server's part (it needs the SDK); a restore does not
// bring that back.
import { readdir, rm } from 'node:fs/promises'
import { join, resolve } from 'node:path'
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { erasureNeedles, needlePattern, pseudonymEmail, pseudonymName } from '#shared/utils/pseudonym'
import { emailKey } from '../services/accounts/sign-in-limits'
import { APPEND_ONLY_TABLES, MIGRATOR_ONLY_TABLES } from './grants'

/** Who is erased and what to look for: the values as they were just before the erasure. */
export interface ErasureTarget {
  membershipId: string
  userId: string
  clubId: string
  pseudonym: string
  pseudonymEmail: string
  /** The member's and the guardian's e-mail, lower case: sign-in limiter keys hold them. */
  emails: string[]
  /** Name, e-mail, phone, guardian's and emergency contact's values with their HTML spellings. */
  needles: string[]
}

/** One step: changes rows inside `transaction`; returns the ids whose files leave the uploads folder after commit. */
export interface ErasureStep {
  name: string
  run: (db: Sequelize, target: ErasureTarget, transaction: Transaction) => Promise<string[] | undefined>
}

/** What one erasure did: rows changed per step are not counted; files are removed after commit. */
export interface ErasureOutcome { fileIds: string[] }

const q = (db: Sequelize, sql: string, target: ErasureTarget, transaction: Transaction, extra: Record<string, unknown> = {}) =>
  db.query(sql, { replacements: { ...target, ...extra }, transaction })

const select = <T extends object>(db: Sequelize, sql: string, target: ErasureTarget, transaction: Transaction) =>
  db.query<T>(sql, { replacements: { ...target }, type: QueryTypes.SELECT, transaction })

// Tables the free-text step leaves alone: the append-only safety records and the audit trail (the
// application may not change them; the app writes ids there, never names: decision 0046), the
// migrations' bookkeeping, the erasure list, the tables the steps above change by id, and the clubs'
// snapshot signing keys (no person's data; base64 that happened to contain a name must not be changed).
const NOT_SEARCHED_TABLES = new Set([...APPEND_ONLY_TABLES, ...MIGRATOR_ONLY_TABLES, 'erasures', 'memberships', 'users', 'club_signing_keys'])
// Copies of a name kept by id: changed for the erased member only, so a namesake keeps theirs. And
// the proof tally's copy of a vessel's construction (a word of a fixed list, kept by trigger).
const NOT_SEARCHED_COLUMNS = new Set(['training_records.trainee_name', 'training_records.trainer_name', 'waiver_acceptances.typed_name',
  'vessel_proof_tallies.construction'])

/**
 * The steps, in order. Each is one line here; a new place where personal data lives (say, another
 * domain's staging rows) is one more step.
 */
export const ERASURE_STEPS: ErasureStep[] = [
  { name: 'membership', run: (db, t, tx) => q(db, `UPDATE memberships SET phone = NULL, birth_date = NULL, emergency_contact_name = NULL,
      emergency_contact_phone = NULL, guardian_name = NULL, guardian_email = NULL, resigned_at = coalesce(resigned_at, now()), updated_at = now()
      WHERE id = :membershipId`, t, tx).then(() => undefined) },
  // No password: the account cannot sign in; the real e-mail is free to sign up afresh.
  { name: 'account', run: (db, t, tx) => q(db, `UPDATE users SET name = :pseudonym, email = :pseudonymEmail, password_hash = NULL,
      email_verified_at = NULL, updated_at = now() WHERE id = :userId`, t, tx).then(() => undefined) },
  { name: 'sign-in limiter keys', run: limiterKeys },
  { name: 'sessions', run: (db, t, tx) => q(db, `UPDATE sessions SET address = '', user_agent = NULL, revoked_at = coalesce(revoked_at, now()),
      revoke_reason = coalesce(revoke_reason, 'resigned') WHERE user_id = :userId`, t, tx).then(() => undefined) },
  { name: 'one-time links', run: (db, t, tx) => q(db, `DELETE FROM action_tokens WHERE user_id = :userId OR membership_id = :membershipId;
      DELETE FROM booking_feed_tokens WHERE membership_id = :membershipId`, t, tx).then(() => undefined) },
  { name: 'stored notices', run: (db, t, tx) => q(db, `UPDATE notices SET to_email = :pseudonymEmail, subject = 'Removed on erasure',
      text_body = 'Removed on erasure.', html_body = '<p>Removed on erasure.</p>', last_error = CASE WHEN status IN ('queued', 'failed') THEN 'The member was erased.' ELSE last_error END,
      status = CASE WHEN status IN ('queued', 'failed') THEN 'skipped' ELSE status END, locked_until = NULL, claim_id = NULL, updated_at = now()
      WHERE membership_id = :membershipId`, t, tx).then(() => undefined) },
  { name: 'names kept by id', run: (db, t, tx) => q(db, `UPDATE training_records SET trainee_name = :pseudonym WHERE membership_id = :membershipId;
      UPDATE training_records SET trainer_name = :pseudonym WHERE trainer_membership_id = :membershipId;
      UPDATE waiver_acceptances SET typed_name = :pseudonym WHERE membership_id = :membershipId`, t, tx).then(() => undefined) },
  // A roster import's staging rows have no club column of their own: the rows naming the member go.
  { name: 'import staging rows', run: (db, t, tx) => q(db, `DELETE FROM import_rows r USING import_jobs j WHERE j.id = r.job_id AND j.club_id = :clubId
      AND (lower(r.email) IN (:emails) OR EXISTS (SELECT 1 FROM unnest(ARRAY[:needles]::text[]) n WHERE strpos(lower(r.cells::text), lower(n)) > 0))`,
  t, tx, { emails: t.emails.length ? t.emails : [''] }).then(() => undefined) },
  { name: 'personal files', run: personalFiles },
  { name: 'payment events', run: paymentEvents },
  { name: 'free text', run: freeText },
  { name: 'erasure list', run: (db, t, tx) => q(db, `INSERT INTO erasures (membership_id, user_id, club_id) VALUES (:membershipId, :userId, :clubId)
      ON CONFLICT (membership_id) DO NOTHING`, t, tx).then(() => undefined) },
]

/**
 * Sign-in limiter rows keyed by the member's or guardian's e-mail (in clear or as the limiter's hash of
 * it, emailKey), or by an address the member signed in from.
 */
async function limiterKeys(db: Sequelize, t: ErasureTarget, tx: Transaction): Promise<undefined> {
  const addresses = (await select<{ address: string }>(db, `SELECT DISTINCT address FROM sessions WHERE user_id = :userId AND address <> ''`, t, tx)).map(r => r.address)
  const parts = [...t.emails, ...t.emails.map(emailKey).map(k => k.toLowerCase()), ...addresses.map(a => a.toLowerCase())]
  if (!parts.length) return
  await q(db, `DELETE FROM rate_limits WHERE EXISTS (SELECT 1 FROM unnest(ARRAY[:parts]::text[]) p WHERE strpos(lower(key), p) > 0)`, t, tx, { parts })
}

/**
 * The files that are the member's own and not the club's safety evidence: photos of their vessels'
 * build and evidence of courses they took elsewhere (a certificate bears their name). Gauge, coupon
 * and incident photos and tier sign-off evidence stay: they are the evidence behind safety records.
 */
async function personalFiles(db: Sequelize, t: ErasureTarget, tx: Transaction): Promise<string[]> {
  const photos = await select<{ id: string }>(db, `DELETE FROM photos WHERE club_id = :clubId AND purpose = 'build'
      AND (uploaded_by_membership_id = :membershipId OR vessel_id IN (SELECT id FROM vessels WHERE owner_membership_id = :membershipId)) RETURNING id`, t, tx)
  const evidence = await select<{ id: string }>(db, `DELETE FROM training_evidence WHERE membership_id = :membershipId RETURNING id`, t, tx)
  return [...photos, ...evidence].map(r => r.id)
}

/** The payment service's event copies (no club column) that mention the member: the needles replaced in their payload. */
async function paymentEvents(db: Sequelize, t: ErasureTarget, tx: Transaction): Promise<undefined> {
  const pattern = needlePattern(t.needles)
  if (!pattern) return
  await q(db, `UPDATE payment_events SET payload = regexp_replace(payload::text, :pattern, :pseudonym, 'gi')::jsonb WHERE payload::text ~* :pattern`, t, tx, { pattern })
}

/**
 * Every other text, varchar and JSON column of every table with a club (found in information_schema,
 * so a new table is searched too): the member's values replaced by the pseudonym in the club's rows.
 * This catches free text that mentions them (an incident's account, a booking note, a vessel's name).
 */
async function freeText(db: Sequelize, t: ErasureTarget, tx: Transaction): Promise<undefined> {
  const pattern = needlePattern(t.needles)
  if (!pattern) return
  const columns = await db.query<{ table_name: string, column_name: string, data_type: string }>(
    `SELECT c.table_name, c.column_name, c.data_type FROM information_schema.columns c
      JOIN information_schema.tables tb ON tb.table_schema = c.table_schema AND tb.table_name = c.table_name AND tb.table_type = 'BASE TABLE'
     WHERE c.table_schema = 'public' AND c.data_type IN ('text', 'character varying', 'json', 'jsonb')
       AND EXISTS (SELECT 1 FROM information_schema.columns k WHERE k.table_schema = 'public' AND k.table_name = c.table_name AND k.column_name = 'club_id')
     ORDER BY c.table_name, c.column_name`, { type: QueryTypes.SELECT, transaction: tx })
  const quote = (name: string) => db.getQueryInterface().quoteIdentifier(name)
  for (const c of columns) {
    if (NOT_SEARCHED_TABLES.has(c.table_name) || NOT_SEARCHED_COLUMNS.has(`${c.table_name}.${c.column_name}`)) continue
    const col = quote(c.column_name)
    const json = c.data_type === 'json' || c.data_type === 'jsonb'
    const value = json ? `${col}::text` : col
    const replaced = `regexp_replace(${value}, :pattern, :pseudonym, 'gi')${json ? `::${c.data_type}` : ''}`
    await q(db, `UPDATE ${quote(c.table_name)} SET ${col} = ${replaced} WHERE club_id = :clubId AND ${value} ~* :pattern`, t, tx, { pattern })
  }
}

interface PersonRow {
  membership_id: string
  user_id: string
  club_id: string
  name: string
  email: string
  phone: string | null
  emergency_contact_name: string | null
  emergency_contact_phone: string | null
  guardian_name: string | null
  guardian_email: string | null
}

const PERSON_SQL = `SELECT m.id AS membership_id, m.user_id, m.club_id, u.name, u.email, m.phone, m.emergency_contact_name,
    m.emergency_contact_phone, m.guardian_name, m.guardian_email
  FROM memberships m JOIN users u ON u.id = m.user_id`

/** The erasure target for a member as their rows stand now (inside `transaction`), or null when there is no such membership. */
export async function erasureTarget(db: Sequelize, membershipId: string, transaction?: Transaction): Promise<ErasureTarget | null> {
  const [row] = await db.query<PersonRow>(`${PERSON_SQL} WHERE m.id = :membershipId`, { replacements: { membershipId }, type: QueryTypes.SELECT, transaction })
  if (!row) return null
  const pseudonym = pseudonymName(row.membership_id)
  const fakeEmail = pseudonymEmail(row.membership_id)
  // An already pseudonymous value is no needle (it would only replace the pseudonym by itself).
  const values = [row.name, row.email, row.phone, row.emergency_contact_name, row.emergency_contact_phone, row.guardian_name, row.guardian_email]
    .filter(v => v !== pseudonym && v !== fakeEmail)
  return {
    membershipId: row.membership_id, userId: row.user_id, clubId: row.club_id, pseudonym, pseudonymEmail: fakeEmail,
    emails: [row.email, row.guardian_email].filter((e): e is string => !!e && e !== fakeEmail).map(e => e.toLowerCase()),
    needles: erasureNeedles(values),
  }
}

/** Runs every erasure step for `target` inside `transaction`; the caller removes the returned files after commit. */
export async function eraseInDatabase(db: Sequelize, target: ErasureTarget, transaction: Transaction): Promise<ErasureOutcome> {
  const fileIds: string[] = []
  for (const step of ERASURE_STEPS) fileIds.push(...(await step.run(db, target, transaction)) ?? [])
  return { fileIds }
}

/** Removes every file in `dir` whose name holds one of `ids` (photos, thumbnails, evidence are named by their id). */
export async function removeFilesOf(dir: string, ids: readonly string[]): Promise<number> {
  if (!ids.length) return 0
  const names = await readdir(dir).catch(() => [] as string[])
  const doomed = names.filter(name => ids.some(id => name.includes(id)))
  await Promise.all(doomed.map(name => rm(join(dir, name), { force: true })))
  return doomed.length
}

/** One entry of the erasure list. */
export interface ErasureEntry { membershipId: string, userId: string, clubId: string }

/** The erasure list as it stands (a restore may read it from the database it replaces and pass it on). */
export async function readErasures(sequelize: Sequelize): Promise<ErasureEntry[]> {
  const rows = await sequelize.query<{ membership_id: string, user_id: string, club_id: string }>(
    'SELECT membership_id, user_id, club_id FROM erasures ORDER BY erased_at', { type: QueryTypes.SELECT })
  return rows.map(r => ({ membershipId: r.membership_id, userId: r.user_id, clubId: r.club_id }))
}

/**
 * Erases again every member on the erasure list (the list in the database, plus `options.entries`,
 * e.g. carried over from the database a restore replaces) whose rows hold personal data again — a
 * restored backup taken before the erasure. Runs the same steps, one transaction per member, and
 * removes their personal files from `options.uploadsDir` (default NUXT_UPLOADS_DIR or .local/uploads).
 * Returns how many members it erased again; members already pseudonymous or not in this database are skipped.
 */
export async function reapplyErasures(sequelize: Sequelize, options: { entries?: ErasureEntry[], uploadsDir?: string } = {}): Promise<number> {
  const entries = new Map<string, ErasureEntry>()
  for (const e of [...await readErasures(sequelize), ...options.entries ?? []]) entries.set(e.membershipId, e)
  const dir = resolve(options.uploadsDir ?? process.env.NUXT_UPLOADS_DIR ?? '.local/uploads')
  let again = 0
  for (const entry of entries.values()) {
    const outcome = await sequelize.transaction(async (transaction) => {
      await sequelize.query('SELECT id FROM memberships WHERE id = :id FOR UPDATE', { replacements: { id: entry.membershipId }, transaction })
      const target = await erasureTarget(sequelize, entry.membershipId, transaction)
      if (!target) return null
      if (!target.needles.length && !await holdsPersonalData(sequelize, target, transaction)) {
        await q(sequelize, `INSERT INTO erasures (membership_id, user_id, club_id) VALUES (:membershipId, :userId, :clubId) ON CONFLICT (membership_id) DO NOTHING`, target, transaction)
        return null
      }
      return eraseInDatabase(sequelize, target, transaction)
    })
    if (!outcome) continue
    await removeFilesOf(dir, outcome.fileIds)
    again++
  }
  return again
}

/** Whether a pseudonymous member still has something the steps remove (a birth date, a password, a link, a personal file). */
async function holdsPersonalData(db: Sequelize, t: ErasureTarget, transaction: Transaction): Promise<boolean> {
  const [row] = await select<{ left: boolean }>(db, `SELECT
      EXISTS (SELECT 1 FROM memberships WHERE id = :membershipId AND (birth_date IS NOT NULL OR resigned_at IS NULL))
   OR EXISTS (SELECT 1 FROM users WHERE id = :userId AND password_hash IS NOT NULL)
   OR EXISTS (SELECT 1 FROM sessions WHERE user_id = :userId AND (address <> '' OR user_agent IS NOT NULL))
   OR EXISTS (SELECT 1 FROM action_tokens WHERE user_id = :userId OR membership_id = :membershipId)
   OR EXISTS (SELECT 1 FROM training_evidence WHERE membership_id = :membershipId)
   OR EXISTS (SELECT 1 FROM photos WHERE purpose = 'build' AND (uploaded_by_membership_id = :membershipId
        OR vessel_id IN (SELECT id FROM vessels WHERE owner_membership_id = :membershipId))) AS left`, t, transaction)
  return !!row?.left
}
