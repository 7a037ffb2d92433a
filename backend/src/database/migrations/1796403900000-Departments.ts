import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Departments an admin adds before the catalogue lists them, so a head can be scoped to a
 * known code only. The catalogue's departments stay derived from its courses.
 */
export class Departments1796403900000 implements MigrationInterface {
  name = 'Departments1796403900000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE departments (
        code text PRIMARY KEY CHECK (code ~ '^[A-Z]{2,6}$'),
        name text,
        created_at timestamptz NOT NULL DEFAULT now()
      )`);
    // Heads already scoped to a code the catalogue lacks keep a listed department.
    await db.query(`
      INSERT INTO departments (code)
      SELECT DISTINCT u.department FROM users u
      WHERE u.department ~ '^[A-Z]{2,6}$'
        AND NOT EXISTS (SELECT 1 FROM courses c WHERE c.department = u.department)`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE departments`);
  }
}
