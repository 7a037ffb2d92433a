import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Model settings as numbered versions: each change by registrar staff is a new
 * row, so the settings behind any estimate can be named and restored.
 */
export class ModelSettings1796184700000 implements MigrationInterface {
  name = 'ModelSettings1796184700000';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE model_settings (
        version integer PRIMARY KEY,
        settings jsonb NOT NULL,
        created_by uuid REFERENCES users (id),
        created_at timestamptz NOT NULL DEFAULT now(),
        note text,
        restored_from integer REFERENCES model_settings (version),
        CONSTRAINT model_settings_version_positive CHECK (version >= 1),
        CONSTRAINT model_settings_is_object CHECK (jsonb_typeof(settings) = 'object')
      )`);
    // Version 1: the defaults of method.md, written out so this migration never changes.
    await db.query(`
      INSERT INTO model_settings (version, settings, note) VALUES (1,
        '{"similarity": "cosine", "iuf": true, "center": true, "k": 30, "minNeighbours": 5,
          "minSimilarity": 0, "significance": 0, "alpha": 0.5}'::jsonb,
        'The defaults of the method description.')`);
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE model_settings`);
  }
}
