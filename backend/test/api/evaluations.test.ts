import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type {
  EvaluationDetail,
  EvaluationResult,
  EvaluationSummary,
  ModelSettings,
} from '@kinpath/contracts';
import { DEFAULT_MODEL_SETTINGS } from '@kinpath/contracts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadGradeScale } from '../../src/grade-scale/grade-scale.model';
import { termSortKey } from '../../src/model/term-keys';
import { api, bearer, DEMO_USERS, signIn, withDatabase } from '../support/api';
import { engineCliArgs } from '../support/engine-cli-args';

/** The engine's command line, built by `npm run build`. */
const ENGINE_CLI = resolve(__dirname, '..', '..', '..', 'packages', 'engine', 'dist', 'cli.js');

const VARIANT: ModelSettings = {
  ...DEFAULT_MODEL_SETTINGS,
  similarity: 'pearson',
  centring: 'studentMean',
  k: 20,
};

let registrar: string;
let backtest: EvaluationDetail;
let scratch: string;

async function waitForBacktest(id: string, timeoutMs = 180_000): Promise<EvaluationDetail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await api()
      .get(`/api/model/evaluations/${id}`)
      .set(...bearer(registrar));
    expect(res.status).toBe(200);
    const body = res.body as EvaluationDetail;
    if (body.status === 'finished' || body.status === 'failed') return body;
    if (Date.now() > deadline) throw new Error(`Backtest ${id} still ${body.status}.`);
    await new Promise((r) => setTimeout(r, 500));
  }
}

beforeAll(async () => {
  registrar = await signIn(DEMO_USERS.registrar);
  scratch = mkdtempSync(join(tmpdir(), 'kinpath-backtest-'));
  const res = await api()
    .post('/api/model/evaluations')
    .set(...bearer(registrar))
    .send({
      configurations: [
        { ...DEFAULT_MODEL_SETTINGS, name: 'Defaults' },
        { ...VARIANT, name: 'Pearson, k 20' },
      ],
    });
  expect(res.status, res.text).toBe(202);
  backtest = await waitForBacktest(res.body.id as string);
}, 240_000);

afterAll(() => {
  if (scratch) rmSync(scratch, { recursive: true, force: true });
});

const find = (rows: EvaluationResult[], signal: string, name: string) => {
  const row = rows.find((r) => r.signal === signal && r.name === name);
  if (!row) throw new Error(`No ${signal} row named ${name}.`);
  return row;
};

describe('backtests through the API', () => {
  it('runs both configurations next to the four baselines, on the last completed term', async () => {
    expect(backtest.status, backtest.message ?? '').toBe('finished');
    expect(backtest.progress).toBe(1);
    const terms = await api()
      .get('/api/terms')
      .set(...bearer(registrar));
    expect(backtest.holdoutTerm).toBe(terms.body.current);
    expect(backtest.createdBy).toBe(DEMO_USERS.registrar);
    expect(backtest.dataState.latestImportId).toMatch(/^[0-9a-f-]{36}$/);
    expect(backtest.dataState.records).toBeGreaterThan(0);
    expect(backtest.configurations.map((c) => c.name)).toEqual(['Defaults', 'Pearson, k 20']);
    for (const signal of ['grade', 'satisfaction']) {
      const names = backtest.results.filter((r) => r.signal === signal).map((r) => r.name);
      expect(names).toEqual([
        'Defaults',
        'Pearson, k 20',
        'Global mean',
        'Course mean',
        'Student mean',
        'Damped bias',
      ]);
      for (const row of backtest.results.filter((r) => r.signal === signal)) {
        expect(row.n).toBeGreaterThan(0);
        expect(row.mae).toBeGreaterThan(0);
        expect(row.rmse).toBeGreaterThanOrEqual(row.mae as number);
      }
    }
  });

  it('splits the grade results by department, adding up to the whole', () => {
    const departments = new Set(backtest.byDepartment.map((r) => r.department));
    expect(departments.size).toBeGreaterThan(1);
    for (const name of ['Defaults', 'Pearson, k 20', 'Damped bias']) {
      const whole = find(backtest.results, 'grade', name);
      const parts = backtest.byDepartment.filter((r) => r.signal === 'grade' && r.name === name);
      const n = parts.reduce((sum, r) => sum + r.n, 0);
      const absolute = parts.reduce((sum, r) => sum + r.n * (r.mae as number), 0);
      const squared = parts.reduce((sum, r) => sum + r.n * (r.rmse as number) ** 2, 0);
      expect(n).toBe(whole.n);
      expect(absolute / n).toBeCloseTo(whole.mae as number, 10);
      expect(Math.sqrt(squared / n)).toBeCloseTo(whole.rmse as number, 10);
    }
  });

  it('equals the engine command line on the same records, exported from the database', async () => {
    const file = join(scratch, 'records.csv');
    const scale = await withDatabase(async (client) => {
      const gradeScale = await loadGradeScale(async (sql) => (await client.query(sql)).rows);
      const { rows } = await client.query<{
        student_pseudonym: string;
        course_code: string;
        term: string;
        grade_points: string | null;
        satisfaction: number | null;
      }>(
        `SELECT student_pseudonym, course_code, term, grade_points, satisfaction
         FROM records ORDER BY student_pseudonym`,
      );
      const lines = ['student,course,term,grade,satisfaction'];
      for (const r of rows) {
        const points = r.grade_points === null ? null : Number(r.grade_points);
        // As the model reads them: points outside the scale wait for a re-derivation.
        const inScale =
          points !== null && points >= gradeScale.minPoints && points <= gradeScale.maxPoints;
        lines.push(
          [
            r.student_pseudonym,
            r.course_code,
            termSortKey(r.term),
            inScale ? String(points) : '',
            r.satisfaction === null ? '' : String(r.satisfaction),
          ].join(','),
        );
      }
      writeFileSync(file, lines.join('\n') + '\n');
      return `${gradeScale.minPoints}:${gradeScale.maxPoints}`;
    });
    const cli = (signal: string, settings: ModelSettings, scaleArg: string) => {
      const out = execFileSync(
        process.execPath,
        [
          ENGINE_CLI,
          'evaluate',
          '--records',
          file,
          '--holdout-term',
          termSortKey(backtest.holdoutTerm),
          '--signal',
          signal,
          '--scale',
          scaleArg,
          ...engineCliArgs(settings, signal as 'grade' | 'satisfaction'),
        ],
        { encoding: 'utf8', timeout: 120_000 },
      );
      return JSON.parse(out.trim().split('\n')[0]) as {
        configurations: { mae: number; rmse: number; coverage: number; n: number }[];
        baselines: Record<string, { mae: number; rmse: number; coverage: number; n: number }>;
      };
    };
    const same = (
      server: EvaluationResult,
      engine: { mae: number; rmse: number; coverage: number; n: number },
    ) => {
      expect(server.n).toBe(engine.n);
      expect(server.mae).toBeCloseTo(engine.mae, 12);
      expect(server.rmse).toBeCloseTo(engine.rmse, 12);
      expect(server.coverage).toBeCloseTo(engine.coverage, 12);
    };
    // Grade: the command line's similarities come from grades too, so every row must agree.
    const byName: [string, ModelSettings][] = [
      ['Defaults', DEFAULT_MODEL_SETTINGS],
      ['Pearson, k 20', VARIANT],
    ];
    for (const [name, settings] of byName) {
      const engine = cli('grade', settings, scale);
      same(find(backtest.results, 'grade', name), engine.configurations[0]);
      if (name === 'Defaults') {
        same(find(backtest.results, 'grade', 'Global mean'), engine.baselines.globalMean);
        same(find(backtest.results, 'grade', 'Course mean'), engine.baselines.courseMean);
        same(find(backtest.results, 'grade', 'Student mean'), engine.baselines.studentMean);
        same(find(backtest.results, 'grade', 'Damped bias'), engine.baselines.dampedBias);
      }
    }
    // Satisfaction: the command line's --signal also picks the similarity signal, while
    // Kinpath always finds kin by grades; the baselines do not depend on it and must agree.
    const satisfaction = cli('satisfaction', DEFAULT_MODEL_SETTINGS, '1:5');
    same(find(backtest.results, 'satisfaction', 'Global mean'), satisfaction.baselines.globalMean);
    same(find(backtest.results, 'satisfaction', 'Damped bias'), satisfaction.baselines.dampedBias);
    expect(find(backtest.results, 'satisfaction', 'Defaults').n).toBe(
      satisfaction.configurations[0].n,
    );
  }, 300_000);

  it('lists past backtests and records them in the audit trail', async () => {
    const list = await api()
      .get('/api/model/evaluations')
      .set(...bearer(registrar));
    expect(list.status).toBe(200);
    const mine = (list.body as EvaluationSummary[]).find((e) => e.id === backtest.id);
    expect(mine).toMatchObject({ status: 'finished', holdoutTerm: backtest.holdoutTerm });
    expect(mine).not.toHaveProperty('results');
    const actions = await withDatabase(async (client) =>
      (
        await client.query<{ action: string }>(
          `SELECT action FROM audit_events WHERE target = $1 ORDER BY id`,
          [`model_evaluation:${backtest.id}`],
        )
      ).rows.map((r) => r.action),
    );
    expect(actions).toEqual(['model.evaluation_requested', 'model.evaluation_finished']);
  });
});

describe('who may run backtests, and what is refused', () => {
  it('answers 403 to every role but registrar, and 401 without a token', async () => {
    const body = { configurations: [DEFAULT_MODEL_SETTINGS] };
    for (const email of [DEMO_USERS.advisor, DEMO_USERS.department_head, DEMO_USERS.admin]) {
      const token = await signIn(email);
      const post = await api()
        .post('/api/model/evaluations')
        .set(...bearer(token))
        .send(body);
      expect(post.status, email).toBe(403);
      const list = await api()
        .get('/api/model/evaluations')
        .set(...bearer(token));
      expect(list.status, email).toBe(403);
    }
    expect((await api().post('/api/model/evaluations').send(body)).status).toBe(401);
  });

  it('validates each configuration as the settings are validated, and the term', async () => {
    const post = (body: unknown) =>
      api()
        .post('/api/model/evaluations')
        .set(...bearer(registrar))
        .send(body as object);
    const tooMany = Array.from({ length: 9 }, () => DEFAULT_MODEL_SETTINGS);
    const cases: [unknown, RegExp][] = [
      [{ configurations: [] }, /at least one configuration/],
      [{ configurations: tooMany }, /at most 8 configurations/],
      [{ configurations: [{ ...DEFAULT_MODEL_SETTINGS, k: 0 }] }, /k must be at least 1/],
      [
        { configurations: [{ ...DEFAULT_MODEL_SETTINGS, k: 3 }] },
        /minNeighbours cannot be larger than k/,
      ],
      [
        { configurations: [{ ...DEFAULT_MODEL_SETTINGS, alpha: 2 }] },
        /alpha must be between 0 and 1/,
      ],
      [
        { configurations: [{ ...DEFAULT_MODEL_SETTINGS, similarity: 'jaccard' }] },
        /cosine or pearson/,
      ],
      [{ holdoutTerm: '2024-XX', configurations: [DEFAULT_MODEL_SETTINGS] }, /term such as/],
      [{ holdoutTerm: '1999-FA', configurations: [DEFAULT_MODEL_SETTINGS] }, /has no records/],
      [
        {
          configurations: [
            DEFAULT_MODEL_SETTINGS,
            { ...DEFAULT_MODEL_SETTINGS, name: 'Configuration 1' },
          ],
        },
        /name of its own/,
      ],
    ];
    for (const [body, message] of cases) {
      const res = await post(body);
      expect(res.status, JSON.stringify(body).slice(0, 120)).toBe(400);
      expect(JSON.stringify(res.body.message)).toMatch(message);
    }
    const missing = await api()
      .get('/api/model/evaluations/00000000-0000-4000-8000-000000000000')
      .set(...bearer(registrar));
    expect(missing.status).toBe(404);
  });
});
