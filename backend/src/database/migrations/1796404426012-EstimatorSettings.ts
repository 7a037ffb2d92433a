import type { MigrationInterface, QueryRunner } from 'typeorm';

const NOTE = 'The baseline-centred estimator of the method description.';

/**
 * The estimator settings (centring, similarity source per estimate, baseline damping,
 * shrinkage, ranking precision). Stored versions keep their meaning: they get the original
 * method's values written out. Then the method's new defaults become a new version, keeping
 * the registrar's other choices, unless the version in force uses Pearson correlation.
 */
export class EstimatorSettings1796404426012 implements MigrationInterface {
  name = 'EstimatorSettings1796404426012';

  public async up(db: QueryRunner): Promise<void> {
    await db.query(`
      UPDATE model_settings SET settings = (settings - 'center') || jsonb_build_object(
        'centring', CASE WHEN settings->>'center' = 'false' THEN 'none' ELSE 'studentMean' END,
        'gradeSimilarity', 'grade', 'satisfactionSimilarity', 'grade',
        'gradeDampingStudent', 5, 'gradeDampingCourse', 5,
        'satisfactionDampingStudent', 5, 'satisfactionDampingCourse', 5,
        'shrinkage', 0, 'tieDigits', 0)
      WHERE settings ? 'center'`);
    await db.query(
      `
      INSERT INTO model_settings (version, settings, note)
      SELECT s.version + 1, s.settings || jsonb_build_object(
        'centring', 'baseline',
        'gradeSimilarity', 'grade', 'satisfactionSimilarity', 'satisfaction+enrolment',
        'gradeDampingStudent', 1, 'gradeDampingCourse', 5,
        'satisfactionDampingStudent', 5, 'satisfactionDampingCourse', 5,
        'shrinkage', 25, 'tieDigits', 12), $1
      FROM model_settings s
      WHERE s.version = (SELECT max(version) FROM model_settings)
        AND s.settings->>'similarity' = 'cosine'`,
      [NOTE],
    );
  }

  public async down(db: QueryRunner): Promise<void> {
    await db.query(
      `DELETE FROM model_settings WHERE note = $1 AND created_by IS NULL
        AND version = (SELECT max(version) FROM model_settings)`,
      [NOTE],
    );
    await db.query(`
      UPDATE model_settings SET settings = (settings
        - 'centring' - 'gradeSimilarity' - 'satisfactionSimilarity'
        - 'gradeDampingStudent' - 'gradeDampingCourse'
        - 'satisfactionDampingStudent' - 'satisfactionDampingCourse'
        - 'shrinkage' - 'tieDigits')
        || jsonb_build_object('center', settings->>'centring' <> 'none')
      WHERE settings ? 'centring'`);
  }
}
