import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Script tokens. Only the SHA-256 of the secret is kept: the secret is 32 random bytes, so a
 * slow password hash would add nothing against guessing, and a plain digest can be looked up
 * by index on every request.
 */
export class ApiTokens1796407100000 implements MigrationInterface {
  name = 'ApiTokens1796407100000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE api_tokens (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        name text NOT NULL CHECK (length(name) BETWEEN 1 AND 80),
        owner_id uuid NOT NULL REFERENCES users (id),
        created_by uuid REFERENCES users (id),
        scopes text[] NOT NULL CHECK (cardinality(scopes) > 0),
        secret_sha256 bytea NOT NULL UNIQUE CHECK (length(secret_sha256) = 32),
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        last_used_at timestamptz,
        revoked_at timestamptz
      )`);
    await db.query(`CREATE INDEX api_tokens_owner ON api_tokens (owner_id, created_at)`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE api_tokens`);
  }
}
