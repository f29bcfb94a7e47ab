import type { MigrationFn } from '../migrator'

/**
 * Dues: plans, payments, refunds and the payment service's events (the dues domain).
 *
 * - `dues_plans`: the club's plans, each a price in integer minor units with a currency and a period
 *   in calendar months, for adults or for juniors. Every club starts with Adult, Junior and Student
 *   (a trigger adds them to a new club); its admin may then change them.
 * - `memberships.dues_plan_id`: the plan a member renews on (null: chosen at the first payment).
 * - `payments`: one per payment or card checkout started. A paid (or later refunded) payment carries
 *   the club's calendar date it was paid on, the paid-through date it replaced and the one it set,
 *   and a receipt number unique and sequential per club (taken from `clubs.next_receipt_number`
 *   under the club row's lock, so a rolled-back payment leaves no gap).
 * - `refunds`: a full refund of one payment (so one per payment at most).
 * - `payment_events`: each event of the payment service, stored under its own id, so a replay
 *   finds it and changes nothing; one that came before the payment it needs waits here ('held').
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE dues_plans (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      code text NOT NULL CHECK (code ~ '^[a-z][a-z0-9_]{1,39}$'),
      name text NOT NULL CHECK (length(btrim(name)) BETWEEN 1 AND 80),
      audience text NOT NULL CHECK (audience IN ('adult', 'junior')),
      price_minor integer NOT NULL CHECK (price_minor BETWEEN 1 AND 100000000),
      currency text NOT NULL CHECK (currency ~ '^[A-Z]{3}$'),
      period_months integer NOT NULL DEFAULT 12 CHECK (period_months BETWEEN 1 AND 36),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (club_id, code),
      UNIQUE (club_id, name),
      UNIQUE (id, club_id)
    );

    ALTER TABLE memberships ADD COLUMN dues_plan_id uuid;
    ALTER TABLE memberships ADD CONSTRAINT memberships_dues_plan_fk
      FOREIGN KEY (dues_plan_id, club_id) REFERENCES dues_plans (id, club_id) ON DELETE RESTRICT;
    ALTER TABLE clubs ADD COLUMN next_receipt_number integer NOT NULL DEFAULT 1 CHECK (next_receipt_number >= 1);

    CREATE TABLE payments (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      plan_id uuid NOT NULL,
      plan_name text NOT NULL CHECK (length(btrim(plan_name)) > 0),
      method text NOT NULL CHECK (method IN ('card', 'cash', 'transfer')),
      status text NOT NULL CHECK (status IN ('pending', 'paid', 'failed', 'expired', 'refunded')),
      amount_minor integer NOT NULL CHECK (amount_minor > 0),
      currency text NOT NULL CHECK (currency ~ '^[A-Z]{3}$'),
      period_months integer NOT NULL CHECK (period_months BETWEEN 1 AND 36),
      paid_on date,
      paid_through_before date,
      paid_through_after date,
      receipt_number integer CHECK (receipt_number >= 1),
      reference text CHECK (length(reference) <= 120),
      failure_code text CHECK (length(failure_code) <= 60),
      failure_message text CHECK (length(failure_message) <= 300),
      provider_customer_id text,
      provider_checkout_id text UNIQUE,
      provider_payment_intent_id text UNIQUE,
      recorded_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (plan_id, club_id) REFERENCES dues_plans (id, club_id) ON DELETE RESTRICT,
      UNIQUE (club_id, receipt_number),
      -- A payment that counted carries its date, both paid-through dates' outcome and a receipt.
      CHECK ((status IN ('paid', 'refunded')) = (paid_on IS NOT NULL AND paid_through_after IS NOT NULL AND receipt_number IS NOT NULL)),
      CHECK (paid_through_after IS NULL OR paid_through_before IS NULL OR paid_through_after > paid_through_before),
      -- Cards go through the payment service; cash and transfers are recorded by an admin, paid at once.
      CHECK (method <> 'card' OR provider_checkout_id IS NOT NULL),
      CHECK (method = 'card' OR (recorded_by_membership_id IS NOT NULL AND provider_checkout_id IS NULL
        AND status IN ('paid', 'refunded')))
    );
    CREATE INDEX payments_membership ON payments (membership_id, created_at DESC);
    CREATE INDEX payments_club_paid_on ON payments (club_id, paid_on DESC);

    CREATE TABLE refunds (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      payment_id uuid NOT NULL UNIQUE REFERENCES payments(id) ON DELETE RESTRICT,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      amount_minor integer NOT NULL CHECK (amount_minor > 0),
      currency text NOT NULL CHECK (currency ~ '^[A-Z]{3}$'),
      refunded_on date NOT NULL,
      paid_through_restored date,
      provider_refund_id text UNIQUE,
      note text CHECK (length(note) <= 300),
      recorded_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE payment_events (
      id text PRIMARY KEY CHECK (length(id) BETWEEN 1 AND 255),
      type text NOT NULL CHECK (length(type) BETWEEN 1 AND 100),
      status text NOT NULL CHECK (status IN ('applied', 'ignored', 'held')),
      -- The payment intent a held event waits for.
      waits_for text,
      payload jsonb NOT NULL,
      received_at timestamptz NOT NULL DEFAULT now(),
      applied_at timestamptz,
      CHECK ((status = 'held') = (waits_for IS NOT NULL))
    );
    CREATE INDEX payment_events_held ON payment_events (waits_for) WHERE status = 'held';

    CREATE FUNCTION add_starting_dues_plans(club uuid) RETURNS void LANGUAGE sql AS $$
      INSERT INTO dues_plans (club_id, code, name, audience, price_minor, currency, period_months) VALUES
        (club, 'adult', 'Adult', 'adult', 6000, 'EUR', 12),
        (club, 'junior', 'Junior', 'junior', 2500, 'EUR', 12),
        (club, 'student', 'Student', 'adult', 3500, 'EUR', 12)
      ON CONFLICT (club_id, code) DO NOTHING
    $$;
    CREATE FUNCTION clubs_add_starting_dues_plans() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      PERFORM add_starting_dues_plans(NEW.id);
      RETURN NEW;
    END $$;
    CREATE TRIGGER clubs_starting_dues_plans AFTER INSERT ON clubs FOR EACH ROW EXECUTE FUNCTION clubs_add_starting_dues_plans();
    SELECT add_starting_dues_plans(id) FROM clubs;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TRIGGER IF EXISTS clubs_starting_dues_plans ON clubs;
    DROP FUNCTION IF EXISTS clubs_add_starting_dues_plans();
    DROP FUNCTION IF EXISTS add_starting_dues_plans(uuid);
    DROP TABLE IF EXISTS payment_events, refunds, payments;
    ALTER TABLE memberships DROP COLUMN IF EXISTS dues_plan_id;
    ALTER TABLE clubs DROP COLUMN IF EXISTS next_receipt_number;
    DROP TABLE IF EXISTS dues_plans;
  `)
}
