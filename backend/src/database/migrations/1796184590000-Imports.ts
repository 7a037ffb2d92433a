import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Registrar imports: the history of each import, its rejected cells, the old
 * values of rows it replaced (so a rollback restores them exactly), and saved
 * column mappings. Term-data rows name the import that wrote them last.
 */
export class Imports1796184590000 implements MigrationInterface {
  name = 'Imports1796184590000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE imports (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        kind text NOT NULL,
        status text NOT NULL DEFAULT 'queued',
        file_name text NOT NULL,
        file_sha256 text NOT NULL,
        file_bytes bigint NOT NULL,
        mapping jsonb,
        delimiter text,
        commit_requested boolean NOT NULL DEFAULT false,
        partial boolean NOT NULL DEFAULT false,
        rows_total integer,
        rows_accepted integer,
        rows_rejected integer,
        rejections_truncated boolean NOT NULL DEFAULT false,
        progress_phase text,
        progress_done integer NOT NULL DEFAULT 0,
        progress_total integer,
        message text,
        created_at timestamptz NOT NULL DEFAULT now(),
        created_by uuid REFERENCES users (id),
        validated_at timestamptz,
        validation_ms integer,
        committed_at timestamptz,
        committed_by uuid REFERENCES users (id),
        commit_ms integer,
        rolled_back_at timestamptz,
        rolled_back_by uuid REFERENCES users (id),
        model_refreshed_at timestamptz,
        CONSTRAINT imports_kind_known
          CHECK (kind IN ('catalogue', 'offerings', 'students', 'records')),
        CONSTRAINT imports_status_known CHECK (status IN
          ('queued', 'validating', 'validated', 'committing', 'committed', 'failed', 'rolled_back')),
        CONSTRAINT imports_sha256_form CHECK (file_sha256 ~ '^[0-9a-f]{64}$')
      )`);
    // The same file twice is refused while the first import of it still stands.
    await db.query(`
      CREATE UNIQUE INDEX imports_live_file ON imports (file_sha256)
      WHERE status NOT IN ('failed', 'rolled_back')`);
    await db.query(`CREATE INDEX imports_created_at ON imports (created_at DESC)`);

    await db.query(`
      CREATE TABLE import_rejections (
        import_id uuid NOT NULL REFERENCES imports (id) ON DELETE CASCADE,
        line integer NOT NULL,
        column_name text NOT NULL,
        value text NOT NULL,
        reason text NOT NULL
      )`);
    await db.query(
      `CREATE INDEX import_rejections_import_line ON import_rejections (import_id, line)`,
    );

    // Rows an import inserted carry its id in import_id; rows it replaced keep
    // their previous values here, with the import that had written them.
    await db.query(`
      CREATE TABLE import_changes (
        import_id uuid NOT NULL REFERENCES imports (id),
        table_name text NOT NULL,
        old_import_id uuid,
        old_row jsonb NOT NULL,
        CONSTRAINT import_changes_table_known
          CHECK (table_name IN ('courses', 'offerings', 'students', 'records'))
      )`);
    await db.query(`CREATE INDEX import_changes_import ON import_changes (import_id, table_name)`);
    await db.query(`CREATE INDEX import_changes_old_import ON import_changes (old_import_id)`);

    await db.query(`
      CREATE TABLE import_mappings (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        name text NOT NULL,
        kind text NOT NULL,
        mapping jsonb NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        created_by uuid REFERENCES users (id),
        CONSTRAINT import_mappings_name_unique UNIQUE (kind, name),
        CONSTRAINT import_mappings_kind_known
          CHECK (kind IN ('catalogue', 'offerings', 'students', 'records'))
      )`);

    for (const table of ['courses', 'offerings', 'students', 'records']) {
      await db.query(`
        ALTER TABLE ${table} ADD CONSTRAINT ${table}_import_fk
        FOREIGN KEY (import_id) REFERENCES imports (id)`);
    }
  }

  public async down(db: QueryRunner): Promise<void> {
    for (const table of ['courses', 'offerings', 'students', 'records']) {
      await db.query(`ALTER TABLE ${table} DROP CONSTRAINT ${table}_import_fk`);
    }
    await db.query(`DROP TABLE import_mappings`);
    await db.query(`DROP TABLE import_changes`);
    await db.query(`DROP TABLE import_rejections`);
    await db.query(`DROP TABLE imports`);
  }
}
