import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Imports: the upload's digest is keyed (HMAC under the pseudonym key, so a small
 * file cannot be reversed by guessing); rows written before hold the plain SHA-256
 * until the server re-keys them at start (`digest_keyed`). A validated import can
 * be discarded, and only a committed file blocks the same file again. The columns
 * a mapping left out are kept for the history.
 */
export class ImportFilePrivacy1796403727902 implements MigrationInterface {
  name = 'ImportFilePrivacy1796403727902';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`ALTER TABLE imports RENAME COLUMN file_sha256 TO file_digest`);
    await db.query(
      `ALTER TABLE imports RENAME CONSTRAINT imports_sha256_form TO imports_digest_form`,
    );
    await db.query(`ALTER TABLE imports ADD COLUMN digest_keyed boolean NOT NULL DEFAULT false`);
    await db.query(`ALTER TABLE imports ADD COLUMN left_out jsonb`);
    await db.query(`ALTER TABLE imports ADD COLUMN discarded_at timestamptz`);
    await db.query(`ALTER TABLE imports ADD COLUMN discarded_by uuid REFERENCES users (id)`);
    await db.query(`ALTER TABLE imports DROP CONSTRAINT imports_status_known`);
    await db.query(`
      ALTER TABLE imports ADD CONSTRAINT imports_status_known CHECK (status IN
        ('queued', 'validating', 'validated', 'committing', 'committed', 'failed',
         'rolled_back', 'discarded'))`);
    await db.query(`DROP INDEX imports_live_file`);
    await db.query(`
      CREATE UNIQUE INDEX imports_committed_file ON imports (file_digest)
      WHERE status IN ('committing', 'committed')`);
    // The upload's plain SHA-256 in the audit trail could be reversed for a small file.
    await db.query(`
      UPDATE audit_events SET detail = detail - 'sha256'
      WHERE action = 'import.uploaded' AND detail ? 'sha256'`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP INDEX imports_committed_file`);
    await db.query(`UPDATE imports SET status = 'failed' WHERE status = 'discarded'`);
    await db.query(`ALTER TABLE imports DROP CONSTRAINT imports_status_known`);
    await db.query(`
      ALTER TABLE imports ADD CONSTRAINT imports_status_known CHECK (status IN
        ('queued', 'validating', 'validated', 'committing', 'committed', 'failed', 'rolled_back'))`);
    await db.query(`
      CREATE UNIQUE INDEX imports_live_file ON imports (file_digest)
      WHERE status NOT IN ('failed', 'rolled_back')`);
    await db.query(`ALTER TABLE imports DROP COLUMN discarded_by`);
    await db.query(`ALTER TABLE imports DROP COLUMN discarded_at`);
    await db.query(`ALTER TABLE imports DROP COLUMN left_out`);
    await db.query(`ALTER TABLE imports DROP COLUMN digest_keyed`);
    await db.query(
      `ALTER TABLE imports RENAME CONSTRAINT imports_digest_form TO imports_sha256_form`,
    );
    await db.query(`ALTER TABLE imports RENAME COLUMN file_digest TO file_sha256`);
  }
}
