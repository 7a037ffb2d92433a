import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Invitations and password resets (single-use tokens, stored only as SHA-256
 * hashes), sign-in sessions that sign-out can end one at a time, and the
 * counters behind sign-in throttling.
 */
export class AccountSecurity1796184850000 implements MigrationInterface {
  name = 'AccountSecurity1796184850000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE account_tokens (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        user_id uuid NOT NULL REFERENCES users (id) ON DELETE CASCADE,
        purpose text NOT NULL,
        token_hash text NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        used_at timestamptz,
        revoked_at timestamptz,
        CONSTRAINT account_tokens_hash_unique UNIQUE (token_hash),
        CONSTRAINT account_tokens_hash_form CHECK (token_hash ~ '^[0-9a-f]{64}$'),
        CONSTRAINT account_tokens_purpose_known
          CHECK (purpose IN ('invitation', 'password_reset'))
      )`);
    await db.query(`CREATE INDEX account_tokens_user ON account_tokens (user_id, purpose)`);

    await db.query(`
      CREATE TABLE sessions (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        user_id uuid NOT NULL REFERENCES users (id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        last_seen_at timestamptz NOT NULL DEFAULT now(),
        -- The absolute end: renewals never carry a session past it.
        expires_at timestamptz NOT NULL,
        ended_at timestamptz,
        end_reason text
      )`);
    await db.query(`CREATE INDEX sessions_user ON sessions (user_id) WHERE ended_at IS NULL`);

    // One row per throttled key: 'account:<email>' or 'address:<ip>'.
    await db.query(`
      CREATE TABLE sign_in_throttle (
        key text PRIMARY KEY,
        failures integer NOT NULL,
        window_started_at timestamptz NOT NULL,
        blocked_until timestamptz
      )`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE sign_in_throttle`);
    await db.query(`DROP TABLE sessions`);
    await db.query(`DROP TABLE account_tokens`);
  }
}
