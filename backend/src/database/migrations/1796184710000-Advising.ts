import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The advisor's workspace: opaque student refs, recent lookups, notes and
 * shortlists. Nothing here refers to the term-data tables by foreign key, so an
 * import can still be rolled back after advisors have worked with its students.
 */
export class Advising1796184710000 implements MigrationInterface {
  name = 'Advising1796184710000';

  public async up(db: QueryRunner): Promise<void> {
    // A random handle per pseudonym: URLs and the audit trail carry the ref, never
    // the pseudonym, which an insider holding the key could map back to a number.
    await db.query(`
      CREATE TABLE student_refs (
        ref text PRIMARY KEY,
        pseudonym text NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT student_refs_pseudonym_unique UNIQUE (pseudonym),
        CONSTRAINT student_refs_ref_form CHECK (ref ~ '^[A-Za-z0-9_-]{16}$'),
        CONSTRAINT student_refs_pseudonym_form CHECK (pseudonym ~ '^[0-9a-f]{64}$')
      )`);

    await db.query(`
      CREATE TABLE student_lookups (
        user_id uuid NOT NULL REFERENCES users (id),
        student_ref text NOT NULL REFERENCES student_refs (ref),
        looked_up_at timestamptz NOT NULL DEFAULT now(),
        PRIMARY KEY (user_id, student_ref)
      )`);
    await db.query(
      `CREATE INDEX student_lookups_user_at ON student_lookups (user_id, looked_up_at DESC)`,
    );

    await db.query(`
      CREATE TABLE advising_notes (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        student_ref text NOT NULL REFERENCES student_refs (ref),
        author_id uuid NOT NULL REFERENCES users (id),
        text text NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT advising_notes_length CHECK (char_length(text) BETWEEN 1 AND 4000)
      )`);
    await db.query(
      `CREATE INDEX advising_notes_student_at ON advising_notes (student_ref, created_at)`,
    );

    await db.query(`
      CREATE TABLE shortlist_items (
        student_ref text NOT NULL REFERENCES student_refs (ref),
        course_code text NOT NULL,
        added_by uuid NOT NULL REFERENCES users (id),
        added_at timestamptz NOT NULL DEFAULT now(),
        PRIMARY KEY (student_ref, course_code),
        CONSTRAINT shortlist_items_code_form CHECK (course_code ~ '^[A-Z]{2,6} [0-9]{3,5}$')
      )`);

    // The last change of each shortlist (removals leave no item row to carry it).
    await db.query(`
      CREATE TABLE shortlist_changes (
        student_ref text PRIMARY KEY REFERENCES student_refs (ref),
        changed_by uuid NOT NULL REFERENCES users (id),
        changed_at timestamptz NOT NULL DEFAULT now()
      )`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE shortlist_changes`);
    await db.query(`DROP TABLE shortlist_items`);
    await db.query(`DROP TABLE advising_notes`);
    await db.query(`DROP TABLE student_lookups`);
    await db.query(`DROP TABLE student_refs`);
  }
}
