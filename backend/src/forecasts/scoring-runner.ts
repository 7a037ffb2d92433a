import { DEFAULT_MODEL_SETTINGS, type ModelSettings } from '@kinpath/contracts';
import {
  calibrateBeta,
  choiceProbabilities,
  forecastDemand,
  interval,
  scoreBatch,
  type ForecastStudent,
} from '@kinpath/engine';
import type { Pool, PoolClient } from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { engineSettings } from '../model/engine-settings';
import {
  completedTermBefore,
  enrolments,
  isEligible,
  loadCohort,
  modelBefore,
  naiveForecast,
  passedBefore,
  planPart,
  studentIndex,
  type CohortData,
  type PartPlan,
  type ScoringPart,
} from './cohort';
import { betaSentence, studentKey } from './forecast-rules';
import type { ScoringJob } from './scoring-queue';

/** Beta when no completed term exists to calibrate on. */
export const FALLBACK_BETA = 0.05;

interface RunRow {
  id: string;
  term: string;
  settings_version: number;
  data_stamp: string;
  parts: string[];
  chunk_size: number;
  status: string;
  backtest_term: string | null;
  calibration_term: string | null;
  beta: number | null;
}

export interface RunnerOptions {
  /** Worker threads per chunk (the engine's scoreBatch). */
  threads: number;
  /** Names this process in the chunk table. */
  worker: string;
  log: (message: string) => void;
}

const PHASE: Record<ScoringPart, 1 | 2> = { calibration: 1, backtest: 1, forecast: 2 };

/**
 * Does the scoring jobs: the same code in every worker process. Each process reads the cohort
 * from the database itself (kept while the term data stays the same), so processes on other
 * machines sharing the database can join a run.
 */
export class ScoringRunner {
  private cohort: CohortData | null = null;
  private index: Map<string, number> | null = null;
  private readonly plans = new Map<string, PartPlan>();
  private readonly settings = new Map<number, ModelSettings>();

  constructor(
    private readonly pool: Pool,
    private readonly send: (jobs: ScoringJob[]) => Promise<void>,
    private readonly options: RunnerOptions,
  ) {}

  async handle(job: ScoringJob): Promise<void> {
    try {
      if (job.kind === 'plan') await this.plan(job.runId);
      else if (job.kind === 'chunk') await this.chunk(job.runId, job.part, job.seq);
      else await this.finalise(job.runId, job.phase);
    } catch (error) {
      const message = (error as Error).message;
      this.options.log(`Scoring job ${job.kind} of run ${job.runId} failed: ${message}`);
      await this.pool.query(
        `UPDATE scoring_runs SET status = 'failed', error = $2, finished_at = now()
         WHERE id = $1 AND status IN ('queued', 'scoring', 'finalising')`,
        [job.runId, message.slice(0, 500)],
      );
    }
  }

  private async run(runId: string): Promise<RunRow | null> {
    const { rows } = await this.pool.query<RunRow>(`SELECT * FROM scoring_runs WHERE id = $1`, [
      runId,
    ]);
    return rows[0] ?? null;
  }

  /** The cohort of the run's data stamp; null when the term data has moved on since the run began. */
  private async data(run: RunRow): Promise<CohortData | null> {
    if (this.cohort?.stamp !== run.data_stamp) {
      const client = await this.pool.connect();
      try {
        const started = Date.now();
        this.cohort = await loadCohort(client);
        this.index = studentIndex(this.cohort);
        this.plans.clear();
        this.options.log(
          `Cohort read in ${Date.now() - started} ms: ${this.cohort.pseudonyms.length} students with records, ${this.cohort.course.length} records.`,
        );
      } finally {
        client.release();
      }
    }
    if (this.cohort.stamp !== run.data_stamp) {
      // A newer run follows the change; this one would mix old and new data.
      await this.pool.query(
        `UPDATE scoring_runs SET status = 'superseded', finished_at = now()
         WHERE id = $1 AND status IN ('queued', 'scoring', 'finalising')`,
        [run.id],
      );
      return null;
    }
    return this.cohort;
  }

  private planFor(data: CohortData, run: RunRow, part: ScoringPart): PartPlan {
    const term =
      part === 'forecast'
        ? run.term
        : part === 'backtest'
          ? run.backtest_term
          : run.calibration_term;
    if (!term) throw new Error(`The run has no ${part} term.`);
    const key = `${part}:${term}`;
    let plan = this.plans.get(key);
    if (!plan) this.plans.set(key, (plan = planPart(data, part, term)));
    return plan;
  }

  private async settingsOf(version: number): Promise<ModelSettings> {
    let s = this.settings.get(version);
    if (!s) {
      const { rows } = await this.pool.query<{ settings: Partial<ModelSettings> }>(
        `SELECT settings FROM model_settings WHERE version = $1`,
        [version],
      );
      s = { ...DEFAULT_MODEL_SETTINGS, ...(rows[0]?.settings ?? {}) };
      this.settings.set(version, s);
    }
    return s;
  }

  private async plan(runId: string): Promise<void> {
    const run = await this.run(runId);
    if (!run || run.status !== 'queued') return;
    const data = await this.data(run);
    if (!data) return;
    const backtest = run.parts.includes('backtest') ? completedTermBefore(data, run.term) : null;
    const calibration =
      backtest && run.parts.includes('calibration') ? completedTermBefore(data, backtest) : null;
    run.backtest_term = backtest;
    run.calibration_term = calibration;
    const parts: ScoringPart[] = ['forecast'];
    if (backtest) parts.push('backtest');
    if (calibration) parts.push('calibration');
    const chunks: { part: ScoringPart; seq: number; first: number; count: number }[] = [];
    let forecastStudents = 0;
    for (const part of parts) {
      const plan = this.planFor(data, run, part);
      if (part === 'forecast') forecastStudents = plan.students.length;
      for (let first = 0, seq = 0; first < plan.students.length; first += run.chunk_size, seq++) {
        chunks.push({
          part,
          seq,
          first,
          count: Math.min(run.chunk_size, plan.students.length - first),
        });
      }
    }
    const client = await this.pool.connect();
    try {
      await client.query('BEGIN');
      const { rowCount } = await client.query(
        `UPDATE scoring_runs SET status = 'scoring', started_at = now(), chunks_total = $2,
           backtest_term = $3, calibration_term = $4, students = $5
         WHERE id = $1 AND status = 'queued'`,
        [run.id, chunks.length, backtest, calibration, forecastStudents],
      );
      if (rowCount !== 1) {
        await client.query('ROLLBACK');
        return;
      }
      if (chunks.length > 0) {
        await client.query(
          `INSERT INTO scoring_chunks (run_id, part, seq, first, count, phase)
           SELECT $1, * FROM unnest($2::text[], $3::int[], $4::int[], $5::int[], $6::smallint[])`,
          [
            run.id,
            chunks.map((c) => c.part),
            chunks.map((c) => c.seq),
            chunks.map((c) => c.first),
            chunks.map((c) => c.count),
            chunks.map((c) => PHASE[c.part]),
          ],
        );
      }
      await client.query('COMMIT');
    } catch (error) {
      await client.query('ROLLBACK').catch(() => undefined);
      throw error;
    } finally {
      client.release();
    }
    const first = chunks.filter((c) => PHASE[c.part] === 1);
    if (first.length === 0) return this.finalise(run.id, 1);
    await this.send(first.map((c) => ({ kind: 'chunk', runId: run.id, part: c.part, seq: c.seq })));
  }

  private async chunk(runId: string, part: ScoringPart, seq: number): Promise<void> {
    const run = await this.run(runId);
    if (!run || run.status !== 'scoring') return;
    const {
      rows: [chunk],
    } = await this.pool.query<{ first: number; count: number; status: string; phase: number }>(
      `SELECT first, count, status, phase FROM scoring_chunks
       WHERE run_id = $1 AND part = $2 AND seq = $3`,
      [runId, part, seq],
    );
    if (!chunk || chunk.status === 'done') return;
    const data = await this.data(run);
    if (!data) return;
    const plan = this.planFor(data, run, part);
    const started = Date.now();
    const students = plan.students.slice(chunk.first, chunk.first + chunk.count);
    const settings = engineSettings(await this.settingsOf(run.settings_version));
    const model = modelBefore(data, plan.term);
    // Every offered elective is scored for everyone (the engine takes one course list per
    // batch); eligibility then picks each student's own set.
    const scores = await scoreBatch(
      model,
      { students, courses: plan.electives, includeTaken: true, settings },
      { workers: this.options.threads, chunkSize: 16 },
    );
    const beta = part === 'forecast' ? run.beta : null;
    const lines: string[] = [];
    let rows = 0;
    for (let x = 0; x < students.length; x++) {
      const s = scores[x];
      const passed = passedBefore(data, this.index?.get(students[x]), plan.term);
      const load = plan.loads[chunk.first + x];
      const keep: number[] = [];
      for (let t = 0; t < s.courses.length; t++) {
        if (isEligible(data, plan.electives[t], passed, plan.term)) keep.push(t);
      }
      const fits = keep.map((t) => s.fit[t]);
      const p = beta === null ? null : choiceProbabilities(fits, load, beta);
      const key = studentKey(students[x]);
      keep.forEach((t, i) => {
        lines.push(
          [
            runId,
            part,
            seq,
            key,
            plan.electives[t],
            load,
            num(s.fit[t]),
            num(s.grade?.value[t]),
            num(s.satisfaction?.value[t]),
            s.grade?.kin[t] ?? 0,
            s.satisfaction?.kin[t] ?? 0,
            p ? num(p[i]) : NULL,
          ].join('\t') + '\n',
        );
      });
      rows += keep.length;
    }
    const scoringMs = Date.now() - started;
    const client = await this.pool.connect();
    let phaseDone = false;
    try {
      await client.query('BEGIN');
      await client.query(
        `DELETE FROM scoring_results WHERE run_id = $1 AND part = $2 AND seq = $3`,
        [runId, part, seq],
      );
      await pipeline(
        Readable.from(batches(lines)),
        client.query(
          copyFrom(
            `COPY scoring_results (run_id, part, seq, student_key, course_code, expected_load, fit,
               predicted_grade, predicted_satisfaction, kin_grade, kin_satisfaction, probability)
             FROM STDIN`,
          ),
        ),
      );
      const marked = await client.query(
        `UPDATE scoring_chunks SET status = 'done', worker = $4, rows = $5, scoring_ms = $6,
           finished_at = now()
         WHERE run_id = $1 AND part = $2 AND seq = $3 AND status <> 'done'`,
        [runId, part, seq, this.options.worker, rows, scoringMs],
      );
      // The run's row lock orders the chunk ends, so exactly one sees its phase complete.
      const locked = await client.query<{ status: string }>(
        `SELECT status FROM scoring_runs WHERE id = $1 FOR UPDATE`,
        [runId],
      );
      if (marked.rowCount !== 1 || locked.rows[0]?.status !== 'scoring') {
        await client.query('ROLLBACK');
        return;
      }
      await client.query(`UPDATE scoring_runs SET chunks_done = chunks_done + 1 WHERE id = $1`, [
        runId,
      ]);
      const left = await client.query<{ n: string }>(
        `SELECT count(*) AS n FROM scoring_chunks WHERE run_id = $1 AND phase = $2 AND status <> 'done'`,
        [runId, chunk.phase],
      );
      phaseDone = Number(left.rows[0].n) === 0;
      await client.query('COMMIT');
    } catch (error) {
      await client.query('ROLLBACK').catch(() => undefined);
      throw error;
    } finally {
      client.release();
    }
    this.options.log(
      `Scored ${part} chunk ${seq} of run ${runId}: ${students.length} students, ${rows} rows in ${scoringMs} ms (${Date.now() - started} ms with storing).`,
    );
    if (phaseDone) await this.send([{ kind: 'finalise', runId, phase: chunk.phase === 1 ? 1 : 2 }]);
  }

  /** The stored rows of a part as the engine's forecast students (sorted, so order is fixed). */
  private async partStudents(
    runId: string,
    part: ScoringPart,
  ): Promise<{ keys: string[]; students: ForecastStudent[] }> {
    const { rows } = await this.pool.query<{
      student_key: string;
      course_code: string;
      fit: number | null;
      expected_load: number;
    }>(
      `SELECT student_key, course_code, fit, expected_load FROM scoring_results
       WHERE run_id = $1 AND part = $2 ORDER BY student_key, course_code`,
      [runId, part],
    );
    const keys: string[] = [];
    const students: { load: number; electives: { course: string; fit: number }[] }[] = [];
    for (const row of rows) {
      if (keys[keys.length - 1] !== row.student_key) {
        keys.push(row.student_key);
        students.push({ load: row.expected_load, electives: [] });
      }
      students[students.length - 1].electives.push({
        course: row.course_code,
        fit: row.fit ?? NaN,
      });
    }
    return { keys, students };
  }

  private offeredElectives(data: CohortData, term: string): string[] {
    return [...(data.offerings.get(term)?.keys() ?? [])]
      .filter((c) => data.courses.get(c)?.elective)
      .sort();
  }

  private actual(data: CohortData, term: string): Map<string, number> {
    const all = enrolments(data, term);
    return new Map(this.offeredElectives(data, term).map((c) => [c, all.get(c) ?? 0]));
  }

  private async finalise(runId: string, phase: 1 | 2): Promise<void> {
    const run = await this.run(runId);
    if (!run || run.status !== 'scoring') return;
    const data = await this.data(run);
    if (!data) return;
    if (phase === 1) await this.finaliseBacktest(run, data);
    else await this.finaliseForecast(run, data);
  }

  /**
   * Phase 1 ends: beta for the backtest from the term before it (in-sample when there is none),
   * the backtest's per-course forecast, and beta for the forecast from the backtest term.
   */
  private async finaliseBacktest(run: RunRow, data: CohortData): Promise<void> {
    let beta = run.beta ?? FALLBACK_BETA;
    let method = betaSentence(beta, null);
    let backtestBeta: number | null = null;
    let backtestMethod: string | null = null;
    const client = await this.pool.connect();
    try {
      await client.query('BEGIN');
      if (run.backtest_term) {
        const term = run.backtest_term;
        const actual = this.actual(data, term);
        const bt = await this.partStudents(run.id, 'backtest');
        const forward = calibrateBeta(bt.students, actual);
        if (run.calibration_term) {
          const cal = await this.partStudents(run.id, 'calibration');
          backtestBeta = calibrateBeta(cal.students, this.actual(data, run.calibration_term)).beta;
          backtestMethod = betaSentence(backtestBeta, run.calibration_term);
        } else {
          backtestBeta = forward.beta;
          backtestMethod = betaSentence(backtestBeta, term, true);
        }
        const demand = new Map(forecastDemand(bt.students, backtestBeta).map((d) => [d.course, d]));
        const naive = naiveForecast(data, term);
        const courses = [...actual.keys()];
        await client.query(
          `INSERT INTO forecast_courses
             (run_id, part, course_code, expected, variance, low, high, actual, naive, naive_term)
           SELECT $1, 'backtest', * FROM unnest($2::text[], $3::float8[], $4::float8[],
             $5::float8[], $6::float8[], $7::int[], $8::int[], $9::text[])`,
          [
            run.id,
            courses,
            courses.map((c) => demand.get(c)?.expected ?? 0),
            courses.map((c) => demand.get(c)?.variance ?? 0),
            courses.map((c) => demand.get(c)?.low ?? 0),
            courses.map((c) => demand.get(c)?.high ?? 0),
            courses.map((c) => actual.get(c) ?? 0),
            courses.map((c) => naive.get(c)?.count ?? 0),
            courses.map((c) => naive.get(c)?.term ?? null),
          ],
        );
        // The backtest's own choice probabilities, kept with its rows.
        const sk: string[] = [];
        const cc: string[] = [];
        const pp: number[] = [];
        bt.students.forEach((s, i) => {
          const p = choiceProbabilities(
            s.electives.map((e) => e.fit),
            s.load,
            backtestBeta as number,
          );
          s.electives.forEach((e, t) => {
            sk.push(bt.keys[i]);
            cc.push(e.course);
            pp.push(p[t]);
          });
        });
        await client.query(
          `UPDATE scoring_results r SET probability = u.p
           FROM unnest($2::text[], $3::text[], $4::float8[]) AS u(s, c, p)
           WHERE r.run_id = $1 AND r.part = 'backtest' AND r.student_key = u.s AND r.course_code = u.c`,
          [run.id, sk, cc, pp],
        );
        beta = forward.beta;
        method = betaSentence(beta, term);
      }
      await client.query(
        `UPDATE scoring_runs SET beta = $2, beta_method = $3, beta_backtest = $4,
           beta_backtest_method = $5, phase = 2
         WHERE id = $1 AND status = 'scoring'`,
        [run.id, beta, method, backtestBeta, backtestMethod],
      );
      await client.query('COMMIT');
    } catch (error) {
      await client.query('ROLLBACK').catch(() => undefined);
      throw error;
    } finally {
      client.release();
    }
    const { rows } = await this.pool.query<{ seq: number }>(
      `SELECT seq FROM scoring_chunks WHERE run_id = $1 AND phase = 2 ORDER BY seq`,
      [run.id],
    );
    if (rows.length === 0) return this.finaliseForecast({ ...run, beta }, data);
    await this.send(
      rows.map((r) => ({ kind: 'chunk', runId: run.id, part: 'forecast', seq: r.seq })),
    );
  }

  /** Phase 2 ends: expected demand and variance per elective are sums over the stored rows. */
  private async finaliseForecast(run: RunRow, data: CohortData): Promise<void> {
    const { rows } = await this.pool.query<{ course_code: string; e: number; v: number }>(
      // Summed in a fixed order, so the figures do not depend on which process stored what when.
      `SELECT course_code, sum(probability ORDER BY student_key) AS e,
         sum(probability * (1 - probability) ORDER BY student_key) AS v
       FROM scoring_results WHERE run_id = $1 AND part = 'forecast' GROUP BY course_code`,
      [run.id],
    );
    const sums = new Map(rows.map((r) => [r.course_code, r]));
    const courses = this.offeredElectives(data, run.term);
    const expected = courses.map((c) => Number(sums.get(c)?.e ?? 0));
    const variance = courses.map((c) => Number(sums.get(c)?.v ?? 0));
    const bounds = courses.map((_, i) => interval(expected[i], variance[i]));
    const client = await this.pool.connect();
    try {
      await client.query('BEGIN');
      await client.query(`DELETE FROM forecast_courses WHERE run_id = $1 AND part = 'forecast'`, [
        run.id,
      ]);
      await client.query(
        `INSERT INTO forecast_courses (run_id, part, course_code, expected, variance, low, high)
         SELECT $1, 'forecast', * FROM unnest($2::text[], $3::float8[], $4::float8[],
           $5::float8[], $6::float8[])`,
        [run.id, courses, expected, variance, bounds.map((b) => b.low), bounds.map((b) => b.high)],
      );
      const done = await client.query(
        `UPDATE scoring_runs SET status = 'done', finished_at = now(),
           rows = (SELECT count(*) FROM scoring_results WHERE run_id = $1)
         WHERE id = $1 AND status = 'scoring'`,
        [run.id],
      );
      if (done.rowCount === 1) {
        // Earlier runs of the term keep their per-course figures; their scored rows can go.
        await client.query(
          `DELETE FROM scoring_results WHERE run_id IN (
             SELECT id FROM scoring_runs
             WHERE term = $1 AND id <> $2 AND status IN ('done', 'superseded', 'failed'))`,
          [run.term, run.id],
        );
      }
      await client.query('COMMIT');
    } catch (error) {
      await client.query('ROLLBACK').catch(() => undefined);
      throw error;
    } finally {
      client.release();
    }
    this.options.log(`Scoring run ${run.id} for ${run.term} is done.`);
  }
}

const NULL = '\\N';

function num(x: number | undefined): string {
  return x === undefined || !Number.isFinite(x) ? NULL : String(x);
}

/** COPY input in pieces of a few thousand lines. */
function* batches(lines: string[]): Generator<string> {
  for (let i = 0; i < lines.length; i += 4096) yield lines.slice(i, i + 4096).join('');
}

export type { PoolClient };
