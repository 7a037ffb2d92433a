import type { MigrationInterface, QueryRunner } from 'typeorm';
import { DemandOutlook1796185100000 } from './1796185100000-DemandOutlook';
import { ScoringStorage1796185200000 } from './1796185200000-ScoringStorage';

/**
 * The outlook as a choice model: one computation per run (the live forecast and its
 * backtests) replaces cohort scoring, so the scored rows and chunks go. Per run, one row per
 * offered elective and term (the live term and each backtest term); the run keeps its summary
 * (θ, q, what drives demand, time per step). Nothing refers to the term-data tables by foreign
 * key, so imports can still be rolled back.
 */
export class ChoiceOutlook1796404495670 implements MigrationInterface {
  name = 'ChoiceOutlook1796404495670';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE forecast_courses`);
    await db.query(`DROP TABLE scoring_results`);
    await db.query(`DROP TABLE scoring_chunks`);
    await db.query(`DROP TABLE scoring_runs`);
    await db.query(`
      CREATE TABLE outlook_runs (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        term text NOT NULL,
        data_stamp text NOT NULL,
        reason text NOT NULL,
        status text NOT NULL DEFAULT 'queued',
        steps_done integer NOT NULL DEFAULT 0,
        steps_total integer NOT NULL DEFAULT 0,
        students integer,
        summary jsonb,
        error text,
        created_at timestamptz NOT NULL DEFAULT now(),
        started_at timestamptz,
        finished_at timestamptz,
        CONSTRAINT outlook_runs_term_form CHECK (term ~ '^[0-9]{4}-(WI|SP|SU|FA)$'),
        CONSTRAINT outlook_runs_status_known CHECK (
          status IN ('queued', 'computing', 'done', 'failed', 'superseded'))
      )`);
    await db.query(
      `CREATE INDEX outlook_runs_term_created ON outlook_runs (term, created_at DESC)`,
    );
    await db.query(`
      CREATE TABLE outlook_courses (
        run_id uuid NOT NULL REFERENCES outlook_runs (id) ON DELETE CASCADE,
        term text NOT NULL,
        part text NOT NULL,
        course_code text NOT NULL,
        expected double precision NOT NULL,
        variance double precision NOT NULL,
        low double precision NOT NULL,
        high double precision NOT NULL,
        no_history boolean NOT NULL,
        actual integer,
        naive double precision NOT NULL,
        naive_term text,
        same_term double precision NOT NULL,
        take_up double precision NOT NULL,
        PRIMARY KEY (run_id, term, course_code),
        CONSTRAINT outlook_courses_part_known CHECK (part IN ('forecast', 'backtest', 'calibration'))
      )`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE outlook_courses`);
    await db.query(`DROP TABLE outlook_runs`);
    await new DemandOutlook1796185100000().up(db);
    await new ScoringStorage1796185200000().up(db);
  }
}
