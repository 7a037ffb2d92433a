import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Cohort scoring at university scale: milliseconds per phase on each chunk and run (where a
 * slow run spends its time), and scored rows that are cheap to write, millions per run:
 * - no primary key: a chunk's rows are written once, under the chunk's lock and together with
 *   its done mark, so they cannot repeat; the unique index cost more than the rest of the write;
 * - no foreign key to the run: its check ran once per row and cost more still; runs are never
 *   deleted, and the rows of a run go when a later run of its term finishes;
 * - the student key as a uuid: the 128-bit key itself, so its form needs no pattern check (a
 *   student number cannot be stored there) and it sorts as its hex digits did;
 * - part and course code in byte order, the order the worker processes use for course codes.
 */
export class ScoringStorage1796185200000 implements MigrationInterface {
  name = 'ScoringStorage1796185200000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`ALTER TABLE scoring_chunks ADD COLUMN phase_ms jsonb`);
    await db.query(`ALTER TABLE scoring_runs ADD COLUMN phase_ms jsonb`);
    await db.query(`
      ALTER TABLE scoring_results
        DROP CONSTRAINT scoring_results_pkey,
        DROP CONSTRAINT scoring_results_run_id_fkey,
        DROP CONSTRAINT scoring_results_key_form,
        ALTER COLUMN student_key TYPE uuid USING student_key::uuid,
        ALTER COLUMN part TYPE text COLLATE "C",
        ALTER COLUMN course_code TYPE text COLLATE "C"`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`
      ALTER TABLE scoring_results
        ALTER COLUMN course_code TYPE text COLLATE "default",
        ALTER COLUMN part TYPE text COLLATE "default",
        ALTER COLUMN student_key TYPE text USING replace(student_key::text, '-', ''),
        ADD CONSTRAINT scoring_results_key_form CHECK (student_key ~ '^[0-9a-f]{32}$'),
        ADD PRIMARY KEY (run_id, part, student_key, course_code),
        ADD CONSTRAINT scoring_results_run_id_fkey
          FOREIGN KEY (run_id) REFERENCES scoring_runs (id) ON DELETE CASCADE`);
    await db.query(`ALTER TABLE scoring_runs DROP COLUMN phase_ms`);
    await db.query(`ALTER TABLE scoring_chunks DROP COLUMN phase_ms`);
  }
}
