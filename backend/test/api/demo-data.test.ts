import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { withDatabase } from '../support/api';

/** The demo generator's student numbers: HR and seven digits. */
const RAW_ID = 'HR[0-9]{7}';

describe('the demo data of the shared test server', () => {
  it('is loaded: every term-data table has rows', async () => {
    const counts = await withDatabase(async (db) => {
      const { rows } = await db.query<Record<string, string>>(`
        SELECT (SELECT count(*) FROM courses) AS courses,
               (SELECT count(*) FROM offerings) AS offerings,
               (SELECT count(*) FROM students) AS students,
               (SELECT count(*) FROM records) AS records,
               (SELECT count(*) FROM grade_scale) AS grade_scale`);
      return rows[0];
    });
    for (const [table, count] of Object.entries(counts)) {
      expect(Number(count), table).toBeGreaterThan(0);
    }
  });

  it('holds no raw student number in any text column of any table', async () => {
    const { leaks, checked } = await withDatabase(async (db) => {
      const { rows: columns } = await db.query<{ table_name: string; column_name: string }>(`
        SELECT c.table_name, c.column_name FROM information_schema.columns c
        JOIN information_schema.tables t
          ON t.table_schema = c.table_schema AND t.table_name = c.table_name
        WHERE c.table_schema = 'public' AND t.table_type = 'BASE TABLE'
          AND c.data_type IN ('text', 'character varying', 'character', 'jsonb', 'json')`);
      const found: string[] = [];
      for (const { table_name: table, column_name: column } of columns) {
        const { rows } = await db.query<{ n: string }>(
          `SELECT count(*) AS n FROM "${table}" WHERE "${column}"::text ~* $1`,
          [RAW_ID],
        );
        if (Number(rows[0].n) > 0) found.push(`${table}.${column}`);
      }
      return { leaks: found, checked: columns.map((c) => `${c.table_name}.${c.column_name}`) };
    });
    // Every text column of students and records is among those checked.
    expect(checked).toEqual(
      expect.arrayContaining([
        'students.pseudonym',
        'students.program',
        'students.entry_term',
        'students.status',
        'records.student_pseudonym',
        'records.term',
        'records.course_code',
        'records.grade',
      ]),
    );
    expect(leaks).toEqual([]);
  });

  it('keeps only 64-hex pseudonyms, none equal to a student number of the demo files', async () => {
    const pseudonyms = await withDatabase(async (db) => {
      const { rows } = await db.query<{ pseudonym: string }>('SELECT pseudonym FROM students');
      return rows.map((r) => r.pseudonym);
    });
    expect(pseudonyms.every((p) => /^[0-9a-f]{64}$/.test(p))).toBe(true);

    const file = process.env.KINPATH_DEMO_DIR && join(process.env.KINPATH_DEMO_DIR, 'students.csv');
    if (file && existsSync(file)) {
      const ids = readFileSync(file, 'utf8')
        .split(/\r?\n/)
        .slice(1)
        .map((line) => line.split(/[,;]/)[0]?.trim())
        .filter(Boolean);
      expect(ids.length).toBeGreaterThan(0);
      const stored = new Set(pseudonyms);
      expect(ids.filter((id) => stored.has(id) || stored.has(id.toLowerCase()))).toEqual([]);
    }
  });

  it('maps letter grades to grade points and gives marks none', async () => {
    const rows = await withDatabase(async (db) => {
      const { rows } = await db.query<{ grade: string; points: string | null }>(
        'SELECT DISTINCT grade, grade_points AS points FROM records',
      );
      return rows;
    });
    const scale: Record<string, number> = { A: 4, 'A-': 3.7, B: 3, 'C+': 2.3, F: 0 };
    for (const row of rows) {
      if (row.grade in scale) expect(Number(row.points)).toBeCloseTo(scale[row.grade], 5);
      if (['W', 'I', 'IP', 'AU', 'P', 'NP'].includes(row.grade)) expect(row.points).toBeNull();
    }
  });
});

describe('the audit trail', () => {
  it('is append-only: UPDATE and DELETE are refused', async () => {
    await withDatabase(async (db) => {
      await db.query(
        `INSERT INTO audit_events (action, detail) VALUES ('test.probe', '{}'::jsonb)`,
      );
      await expect(db.query(`UPDATE audit_events SET action = 'changed'`)).rejects.toThrow(
        /append-only/,
      );
      await expect(db.query(`DELETE FROM audit_events`)).rejects.toThrow(/append-only/);
      await expect(db.query(`TRUNCATE audit_events`)).rejects.toThrow(/append-only/);
    });
  });

  it('records sign-in success and failure with the e-mail, never the password', async () => {
    const { api } = await import('../support/api');
    const marker = `not-the-password-${Date.now()}`;
    await api()
      .post('/api/auth/login')
      .send({ email: 'registrar@halden.example', password: marker });
    await api()
      .post('/api/auth/login')
      .send({ email: 'registrar@halden.example', password: 'kinpath-demo-2026' });
    const events = await withDatabase(async (db) => {
      const { rows } = await db.query<{ action: string; actor_email: string; detail: unknown }>(
        `SELECT action, actor_email, detail FROM audit_events
         WHERE actor_email = 'registrar@halden.example' ORDER BY id DESC LIMIT 2`,
      );
      return rows;
    });
    expect(events.map((e) => e.action)).toEqual(['auth.sign_in', 'auth.sign_in_failed']);
    expect(JSON.stringify(events)).not.toContain(marker);
    expect(JSON.stringify(events)).not.toContain('kinpath-demo-2026');
  });
});
