import { createReadStream } from 'node:fs';
import { pipeline } from 'node:stream/promises';
import { Transform } from 'node:stream';
import type { ImportKind } from '@kinpath/contracts';
import type { ClientBase } from 'pg';
import { from as copyFrom } from 'pg-copy-streams';

/** Term-data writes (commits, rollbacks, grade-scale changes) take this lock, one at a time. */
export const TERM_DATA_LOCK = `SELECT pg_advisory_xact_lock(hashtext('kinpath:term-data'))`;

interface TableSpec {
  table: 'courses' | 'offerings' | 'students' | 'records';
  key: string[];
  /** Columns replaced on conflict, besides import_id. */
  values: string[];
}

const TABLES: Record<ImportKind, TableSpec> = {
  catalogue: {
    table: 'courses',
    key: ['course_code'],
    values: ['title', 'department', 'credits', 'level', 'elective', 'prerequisites', 'description'],
  },
  offerings: { table: 'offerings', key: ['term', 'course_code'], values: ['sections', 'capacity'] },
  students: { table: 'students', key: ['pseudonym'], values: ['program', 'entry_term', 'status'] },
  records: {
    table: 'records',
    key: ['student_pseudonym', 'term', 'course_code'],
    values: ['grade', 'grade_points', 'satisfaction', 'credits_attempted'],
  },
};

/** The staging table of each kind: the columns validation writes, in its order. */
const STAGE_COLUMNS: Record<ImportKind, string> = {
  catalogue: `course_code text, title text, department text, credits numeric, level text,
    elective boolean, prerequisites text, description text`,
  offerings: `term text, course_code text, sections integer, capacity integer`,
  students: `pseudonym text, program text, entry_term text, status text`,
  records: `student_pseudonym text, term text, course_code text, grade text,
    satisfaction smallint, credits_attempted numeric`,
};

/** Grade points as the grade scale gives them: a letter's points, a number as itself, a mark none. */
export const GRADE_POINTS_SQL = (grade: string, scale: string) =>
  `COALESCE(${scale}.points, CASE WHEN ${grade} ~ '^[0-9]' THEN ${grade}::numeric END)`;

function selectFromStage(kind: ImportKind): string {
  switch (kind) {
    case 'catalogue':
      return `SELECT course_code, title, department, credits, level, elective,
        coalesce(prerequisites, ''), description, $1::uuid FROM import_stage`;
    case 'offerings':
      return `SELECT term, course_code, sections, capacity, $1::uuid FROM import_stage`;
    case 'students':
      return `SELECT pseudonym, program, entry_term, coalesce(status, 'active'), $1::uuid
        FROM import_stage`;
    case 'records':
      return `SELECT s.student_pseudonym, s.term, s.course_code, s.grade,
        ${GRADE_POINTS_SQL('s.grade', 'g')}, s.satisfaction, s.credits_attempted, $1::uuid
        FROM import_stage s LEFT JOIN grade_scale g ON g.letter = s.grade`;
  }
}

export interface CommitCounts {
  inserted: number;
  replaced: number;
  studentsCreated: number;
}

/**
 * Writes the accepted rows of one import, inside the caller's transaction: COPY
 * into a staging table, keep the old values of rows about to be replaced, then
 * one set-based INSERT … ON CONFLICT DO UPDATE.
 */
export async function commitRows(
  client: ClientBase,
  importId: string,
  kind: ImportKind,
  acceptedPath: string,
  onCopied?: (rows: number) => void,
  onStep?: (step: string, ms: number) => void,
): Promise<CommitCounts> {
  const spec = TABLES[kind];
  let mark = Date.now();
  const step = (name: string) => {
    const now = Date.now();
    onStep?.(name, now - mark);
    mark = now;
  };
  // Several imports may share one transaction (the demo), so the stage is dropped after use too.
  await client.query(`DROP TABLE IF EXISTS pg_temp.import_stage`);
  await client.query(`CREATE TEMP TABLE import_stage (${STAGE_COLUMNS[kind]}) ON COMMIT DROP`);
  let copied = 0;
  const counter = new Transform({
    transform(chunk: Buffer, _encoding, done) {
      for (let i = 0; i < chunk.length; i++) if (chunk[i] === 10) copied++;
      if (onCopied && copied % 50_000 < 2_000) onCopied(copied);
      done(null, chunk);
    },
  });
  await pipeline(
    createReadStream(acceptedPath, { highWaterMark: 1 << 20 }),
    counter,
    client.query(copyFrom(`COPY import_stage FROM STDIN WITH (FORMAT csv)`)),
  );
  onCopied?.(copied);
  step('copy');
  await client.query(`ANALYZE import_stage`);
  step('analyze');

  let studentsCreated = 0;
  if (kind === 'records') {
    // data.md: a record for a student not yet known creates that student as active.
    const created = await client.query(
      `INSERT INTO students (pseudonym, status, import_id)
       SELECT DISTINCT student_pseudonym, 'active', $1::uuid FROM import_stage
       ON CONFLICT (pseudonym) DO NOTHING`,
      [importId],
    );
    studentsCreated = created.rowCount ?? 0;
    step('students');
  }

  const keyJoin = spec.key.map((k) => `t.${k} = s.${k}`).join(' AND ');
  const kept = await client.query(
    `INSERT INTO import_changes (import_id, table_name, old_import_id, old_row)
     SELECT $1::uuid, '${spec.table}', t.import_id, to_jsonb(t)
     FROM ${spec.table} t JOIN import_stage s ON ${keyJoin}`,
    [importId],
  );
  step('old values');
  const columns = [...spec.key, ...spec.values, 'import_id'];
  // The foreign keys stay in place and check row by row: dropping and re-adding them
  // would hold this table and the tables it refers to (courses, students) exclusively
  // until the commit ends, and every page reads those. Rows and row locks only, so
  // readers go on seeing the term data as it was until the commit.
  const written = await client.query(
    `INSERT INTO ${spec.table} (${columns.join(', ')})
     ${selectFromStage(kind)}
     ORDER BY ${spec.key.map((_, i) => i + 1).join(', ')}
     ON CONFLICT (${spec.key.join(', ')}) DO UPDATE SET
     ${[...spec.values, 'import_id'].map((c) => `${c} = EXCLUDED.${c}`).join(', ')}`,
    [importId],
  );
  step('upsert');
  await client.query(`DROP TABLE pg_temp.import_stage`);
  const replaced = kept.rowCount ?? 0;
  return { inserted: (written.rowCount ?? 0) - replaced, replaced, studentsCreated };
}

export interface RollbackBlocker {
  id: string;
  kind: string;
  file_name: string;
  created_at: Date;
  committed_at: Date | null;
}

/** Later imports, still committed, that replaced rows this import wrote; latest first. */
export async function rollbackBlockers(
  client: ClientBase,
  importId: string,
): Promise<RollbackBlocker[]> {
  const { rows } = await client.query<RollbackBlocker>(
    `SELECT i.id, i.kind, i.file_name, i.created_at, i.committed_at FROM imports i
     WHERE i.status = 'committed' AND i.id <> $1::uuid
       AND EXISTS (SELECT 1 FROM import_changes c WHERE c.import_id = i.id AND c.old_import_id = $1::uuid)
     ORDER BY i.committed_at DESC NULLS LAST`,
    [importId],
  );
  return rows;
}

/** Which tables refer to each table's key, and by which column. */
const REFERRERS: Partial<
  Record<TableSpec['table'], { table: string; column: string; key: string }[]>
> = {
  courses: [
    { table: 'offerings', column: 'course_code', key: 'course_code' },
    { table: 'records', column: 'course_code', key: 'course_code' },
  ],
  students: [{ table: 'records', column: 'student_pseudonym', key: 'pseudonym' }],
};

/**
 * Imports whose rows refer to rows that `importId` inserted (the rows a rollback
 * would delete), oldest first; run after the replaced rows are restored.
 */
export async function rollbackReferrers(
  client: ClientBase,
  importId: string,
  table: TableSpec['table'],
): Promise<RollbackBlocker[] | null> {
  const refs = REFERRERS[table] ?? [];
  if (!refs.length) return null;
  const found = await client.query<{ n: number }>(
    `SELECT count(*)::int AS n FROM (${refs
      .map(
        (r) =>
          `SELECT 1 FROM ${r.table} x JOIN ${table} t ON x.${r.column} = t.${r.key}
           WHERE t.import_id = $1::uuid AND x.import_id IS DISTINCT FROM $1::uuid`,
      )
      .join(' UNION ALL ')}) any_ref`,
    [importId],
  );
  if (!found.rows[0].n) return null;
  const { rows } = await client.query<RollbackBlocker>(
    `SELECT i.id, i.kind, i.file_name, i.created_at, i.committed_at FROM imports i
     WHERE i.id IN (${refs
       .map(
         (r) =>
           `SELECT DISTINCT x.import_id FROM ${r.table} x JOIN ${table} t ON x.${r.column} = t.${r.key}
            WHERE t.import_id = $1::uuid AND x.import_id IS DISTINCT FROM $1::uuid`,
       )
       .join(' UNION ')})
     ORDER BY i.committed_at DESC NULLS LAST`,
    [importId],
  );
  return rows;
}

export async function rollbackRows(
  client: ClientBase,
  importId: string,
  kind: ImportKind,
  onReferred?: (referrers: RollbackBlocker[]) => Promise<never>,
): Promise<{ restored: number; deleted: number }> {
  const specs = kind === 'records' ? [TABLES.records, TABLES.students] : [TABLES[kind]];
  let restored = 0;
  let deleted = 0;
  for (const spec of specs) {
    const all = [...spec.values, 'import_id'];
    const result = await client.query(
      `UPDATE ${spec.table} t SET (${all.join(', ')}) = (${all.map((c) => `o.${c}`).join(', ')})
       FROM (SELECT (jsonb_populate_record(NULL::${spec.table}, old_row)).*
             FROM import_changes WHERE import_id = $1::uuid AND table_name = '${spec.table}') o
       WHERE ${spec.key.map((k) => `t.${k} = o.${k}`).join(' AND ')}`,
      [importId],
    );
    restored += result.rowCount ?? 0;
    if (onReferred) {
      const referrers = await rollbackReferrers(client, importId, spec.table);
      if (referrers) await onReferred(referrers);
    }
    const removed = await client.query(`DELETE FROM ${spec.table} WHERE import_id = $1::uuid`, [
      importId,
    ]);
    deleted += removed.rowCount ?? 0;
  }
  return { restored, deleted };
}

/** Re-derives every stored record's grade points from the current scale, in one statement. */
export async function rederiveGradePoints(client: ClientBase): Promise<number> {
  const result = await client.query(
    `UPDATE records r SET grade_points = n.points
     FROM (SELECT DISTINCT r.grade, ${GRADE_POINTS_SQL('r.grade', 'g')} AS points
           FROM records r LEFT JOIN grade_scale g ON g.letter = r.grade) n
     WHERE r.grade = n.grade AND r.grade_points IS DISTINCT FROM n.points`,
  );
  return result.rowCount ?? 0;
}
