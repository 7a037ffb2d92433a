import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Accounts, the audit trail, and the term-data tables that imports fill.
 * Term data carries a nullable `import_id` so each row can name the import that
 * wrote it; the imports table and its foreign keys arrive with the import feature.
 */
export class InitialSchema1796184580000 implements MigrationInterface {
  name = 'InitialSchema1796184580000';

  public async up(db: QueryRunner): Promise<void> {
    // Term strings do not sort in time order as text (FA < SP < SU < WI), so SQL
    // orders them through this function; IMMUTABLE lets indexes use it.
    await db.query(`
      CREATE FUNCTION term_ordinal(term text) RETURNS integer
      LANGUAGE sql IMMUTABLE STRICT PARALLEL SAFE AS $$
        SELECT substr(term, 1, 4)::integer * 4
             + array_position(ARRAY['WI', 'SP', 'SU', 'FA'], substr(term, 6, 2)) - 1
      $$`);

    await db.query(`
      CREATE TABLE users (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        email text NOT NULL,
        display_name text NOT NULL,
        role text NOT NULL,
        department text,
        password_hash text,
        active boolean NOT NULL DEFAULT true,
        token_version integer NOT NULL DEFAULT 0,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT users_email_unique UNIQUE (email),
        CONSTRAINT users_email_lower CHECK (email = lower(email)),
        CONSTRAINT users_role_known
          CHECK (role IN ('admin', 'registrar', 'advisor', 'department_head')),
        CONSTRAINT users_department_code CHECK (department ~ '^[A-Z]{2,6}$'),
        CONSTRAINT users_head_has_department
          CHECK (role <> 'department_head' OR department IS NOT NULL),
        -- An account without a password (invitation pending) cannot be active.
        CONSTRAINT users_active_has_password CHECK (NOT active OR password_hash IS NOT NULL)
      )`);

    await db.query(`
      CREATE TABLE audit_events (
        id bigserial PRIMARY KEY,
        at timestamptz NOT NULL DEFAULT now(),
        actor_id uuid,
        actor_email text,
        action text NOT NULL,
        target text,
        detail jsonb NOT NULL DEFAULT '{}'::jsonb
      )`);
    await db.query(`CREATE INDEX audit_events_at ON audit_events (at)`);
    await db.query(`CREATE INDEX audit_events_action_at ON audit_events (action, at)`);
    await db.query(`CREATE INDEX audit_events_actor_at ON audit_events (actor_email, at)`);
    await db.query(`
      CREATE FUNCTION audit_events_refuse_change() RETURNS trigger
      LANGUAGE plpgsql AS $$
      BEGIN
        RAISE EXCEPTION 'audit_events is append-only: % is not allowed', TG_OP
          USING ERRCODE = 'insufficient_privilege';
      END
      $$`);
    await db.query(`
      CREATE TRIGGER audit_events_no_update_or_delete
      BEFORE UPDATE OR DELETE ON audit_events
      FOR EACH ROW EXECUTE FUNCTION audit_events_refuse_change()`);
    await db.query(`
      CREATE TRIGGER audit_events_no_truncate
      BEFORE TRUNCATE ON audit_events
      FOR EACH STATEMENT EXECUTE FUNCTION audit_events_refuse_change()`);

    await db.query(`
      CREATE TABLE courses (
        course_code text PRIMARY KEY,
        title text NOT NULL,
        department text NOT NULL,
        credits numeric(5, 2),
        level text,
        elective boolean NOT NULL DEFAULT true,
        prerequisites text NOT NULL DEFAULT '',
        description text,
        import_id uuid,
        CONSTRAINT courses_code_form CHECK (course_code ~ '^[A-Z]{2,6} [0-9]{3,5}$'),
        CONSTRAINT courses_department_code CHECK (department ~ '^[A-Z]{2,6}$'),
        CONSTRAINT courses_credits_range CHECK (credits >= 0)
      )`);
    await db.query(`CREATE INDEX courses_department ON courses (department)`);

    await db.query(`
      CREATE TABLE offerings (
        term text NOT NULL,
        course_code text NOT NULL REFERENCES courses (course_code),
        sections integer,
        capacity integer NOT NULL,
        import_id uuid,
        PRIMARY KEY (term, course_code),
        CONSTRAINT offerings_term_form CHECK (term ~ '^[0-9]{4}-(WI|SP|SU|FA)$'),
        CONSTRAINT offerings_sections_range CHECK (sections >= 0),
        CONSTRAINT offerings_capacity_range CHECK (capacity >= 0)
      )`);
    await db.query(`CREATE INDEX offerings_course ON offerings (course_code)`);

    await db.query(`
      CREATE TABLE students (
        pseudonym text PRIMARY KEY,
        program text,
        entry_term text,
        status text NOT NULL DEFAULT 'active',
        import_id uuid,
        -- A pseudonym is an HMAC-SHA256 in hex; anything else is a raw identifier leaking in.
        CONSTRAINT students_pseudonym_form CHECK (pseudonym ~ '^[0-9a-f]{64}$'),
        CONSTRAINT students_entry_term_form CHECK (entry_term ~ '^[0-9]{4}-(WI|SP|SU|FA)$'),
        CONSTRAINT students_status_known
          CHECK (status IN ('active', 'graduated', 'withdrawn', 'on_leave'))
      )`);

    // The primary key leads with the student, so it also serves lookups by student.
    await db.query(`
      CREATE TABLE records (
        student_pseudonym text NOT NULL REFERENCES students (pseudonym),
        term text NOT NULL,
        course_code text NOT NULL REFERENCES courses (course_code),
        grade text NOT NULL,
        grade_points numeric(5, 2),
        satisfaction smallint,
        credits_attempted numeric(5, 2),
        import_id uuid,
        PRIMARY KEY (student_pseudonym, term, course_code),
        CONSTRAINT records_term_form CHECK (term ~ '^[0-9]{4}-(WI|SP|SU|FA)$'),
        CONSTRAINT records_satisfaction_range CHECK (satisfaction BETWEEN 1 AND 5),
        CONSTRAINT records_credits_range CHECK (credits_attempted >= 0)
      )`);
    await db.query(`CREATE INDEX records_course_term ON records (course_code, term)`);

    await db.query(`
      CREATE TABLE grade_scale (
        letter text PRIMARY KEY,
        points numeric(5, 2),
        passing boolean NOT NULL,
        sort_order smallint NOT NULL
      )`);
    // The default scale of data.md, written out so this migration never changes.
    await db.query(`
      INSERT INTO grade_scale (letter, points, passing, sort_order) VALUES
        ('A', 4.0, true, 1), ('A-', 3.7, true, 2), ('B+', 3.3, true, 3), ('B', 3.0, true, 4),
        ('B-', 2.7, true, 5), ('C+', 2.3, true, 6), ('C', 2.0, true, 7), ('C-', 1.7, true, 8),
        ('D+', 1.3, true, 9), ('D', 1.0, true, 10), ('D-', 0.7, true, 11), ('F', 0.0, false, 12),
        ('W', NULL, false, 13), ('I', NULL, false, 14), ('IP', NULL, false, 15),
        ('AU', NULL, false, 16), ('P', NULL, true, 17), ('NP', NULL, false, 18)`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE grade_scale`);
    await db.query(`DROP TABLE records`);
    await db.query(`DROP TABLE students`);
    await db.query(`DROP TABLE offerings`);
    await db.query(`DROP TABLE courses`);
    await db.query(`DROP TABLE audit_events`);
    await db.query(`DROP FUNCTION audit_events_refuse_change()`);
    await db.query(`DROP TABLE users`);
    await db.query(`DROP FUNCTION term_ordinal(text)`);
  }
}
