import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Notes their author may edit (when, kept beside the note) or delete; and the summaries sent
 * to a student, listed on the student page: when, to which address, which courses. The student
 * is known by ref only, as everywhere in advising.
 */
export class NoteEditsAndSentSummaries1796405000000 implements MigrationInterface {
  name = 'NoteEditsAndSentSummaries1796405000000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`ALTER TABLE advising_notes ADD COLUMN edited_at timestamptz`);
    await db.query(`
      CREATE TABLE sent_summaries (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        student_ref text NOT NULL REFERENCES student_refs (ref),
        sender_id uuid NOT NULL REFERENCES users (id),
        to_address text NOT NULL,
        term text NOT NULL,
        course_codes text[] NOT NULL,
        sent_at timestamptz NOT NULL DEFAULT now()
      )`);
    await db.query(
      `CREATE INDEX sent_summaries_student_at ON sent_summaries (student_ref, sent_at DESC)`,
    );
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE sent_summaries`);
    await db.query(`ALTER TABLE advising_notes DROP COLUMN edited_at`);
  }
}
