import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Backtests of model configurations: each row keeps the configurations it
 * tested, the term data it ran on (the latest import) and its results, so a
 * past backtest can be read again after the settings or the data changed.
 */
export class ModelEvaluations1796184937000 implements MigrationInterface {
  name = 'ModelEvaluations1796184937000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE model_evaluations (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        status text NOT NULL DEFAULT 'queued',
        progress real NOT NULL DEFAULT 0,
        holdout_term text NOT NULL,
        configurations jsonb NOT NULL,
        settings_version integer REFERENCES model_settings (version),
        latest_import_id uuid REFERENCES imports (id) ON DELETE SET NULL,
        latest_import_at timestamptz,
        records integer,
        students integer,
        results jsonb,
        by_department jsonb,
        message text,
        created_by uuid REFERENCES users (id),
        created_at timestamptz NOT NULL DEFAULT now(),
        started_at timestamptz,
        finished_at timestamptz,
        CONSTRAINT model_evaluations_status_known
          CHECK (status IN ('queued', 'running', 'finished', 'failed')),
        CONSTRAINT model_evaluations_progress_range CHECK (progress >= 0 AND progress <= 1),
        CONSTRAINT model_evaluations_configurations_list
          CHECK (jsonb_typeof(configurations) = 'array')
      )`);
    await db.query(
      `CREATE INDEX model_evaluations_created_at ON model_evaluations (created_at DESC)`,
    );
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE model_evaluations`);
  }
}
