import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The demand outlook: cohort scoring runs split into chunks (so several worker processes can
 * share one run), the scored rows, and the per-course forecast of each run. Student rows carry a
 * key derived from the pseudonym, never a student number; nothing refers to the term-data
 * tables by foreign key, so imports can still be rolled back.
 */
export class DemandOutlook1796185100000 implements MigrationInterface {
  name = 'DemandOutlook1796185100000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE scoring_runs (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        term text NOT NULL,
        settings_version integer NOT NULL,
        data_stamp text NOT NULL,
        reason text NOT NULL,
        parts text[] NOT NULL,
        chunk_size integer NOT NULL,
        status text NOT NULL DEFAULT 'queued',
        phase smallint NOT NULL DEFAULT 1,
        chunks_total integer NOT NULL DEFAULT 0,
        chunks_done integer NOT NULL DEFAULT 0,
        students integer,
        rows integer,
        backtest_term text,
        calibration_term text,
        beta double precision,
        beta_backtest double precision,
        beta_method text,
        beta_backtest_method text,
        error text,
        created_at timestamptz NOT NULL DEFAULT now(),
        started_at timestamptz,
        finished_at timestamptz,
        CONSTRAINT scoring_runs_term_form CHECK (term ~ '^[0-9]{4}-(WI|SP|SU|FA)$'),
        CONSTRAINT scoring_runs_status_known CHECK (
          status IN ('queued', 'scoring', 'finalising', 'done', 'failed', 'superseded'))
      )`);
    await db.query(
      `CREATE INDEX scoring_runs_term_created ON scoring_runs (term, created_at DESC)`,
    );

    await db.query(`
      CREATE TABLE scoring_chunks (
        run_id uuid NOT NULL REFERENCES scoring_runs (id) ON DELETE CASCADE,
        part text NOT NULL,
        seq integer NOT NULL,
        first integer NOT NULL,
        count integer NOT NULL,
        phase smallint NOT NULL,
        status text NOT NULL DEFAULT 'queued',
        worker text,
        rows integer,
        scoring_ms integer,
        finished_at timestamptz,
        PRIMARY KEY (run_id, part, seq),
        CONSTRAINT scoring_chunks_part_known CHECK (part IN ('forecast', 'backtest', 'calibration'))
      )`);

    await db.query(`
      CREATE TABLE scoring_results (
        run_id uuid NOT NULL REFERENCES scoring_runs (id) ON DELETE CASCADE,
        part text NOT NULL,
        seq integer NOT NULL,
        student_key text NOT NULL,
        course_code text NOT NULL,
        expected_load double precision NOT NULL,
        fit double precision,
        predicted_grade double precision,
        predicted_satisfaction double precision,
        kin_grade integer NOT NULL,
        kin_satisfaction integer NOT NULL,
        probability double precision,
        PRIMARY KEY (run_id, part, student_key, course_code),
        CONSTRAINT scoring_results_key_form CHECK (student_key ~ '^[0-9a-f]{32}$')
      )`);

    await db.query(`
      CREATE TABLE forecast_courses (
        run_id uuid NOT NULL REFERENCES scoring_runs (id) ON DELETE CASCADE,
        part text NOT NULL,
        course_code text NOT NULL,
        expected double precision NOT NULL,
        variance double precision NOT NULL,
        low double precision NOT NULL,
        high double precision NOT NULL,
        actual integer,
        naive integer,
        naive_term text,
        PRIMARY KEY (run_id, part, course_code)
      )`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE forecast_courses`);
    await db.query(`DROP TABLE scoring_results`);
    await db.query(`DROP TABLE scoring_chunks`);
    await db.query(`DROP TABLE scoring_runs`);
  }
}
