import { DEFAULT_MODEL_SETTINGS, type ModelSettings } from '@kinpath/contracts';
import {
  calibrateBeta,
  choiceProbabilities,
  forecastDemand,
  interval,
  scoreBatch,
  type ForecastStudent,
  type Model,
  type Settings,
} from '@kinpath/engine';
import type { Pool, PoolClient } from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { engineSettings } from '../model/engine-settings';
import {
  eligibleElectives,
  enrolments,
  loadCohort,
  modelBefore,
  naiveForecast,
  outlineRun,
  planPart,
  studentIndex,
  type CohortData,
  type PartPlan,
  type ScoringPart,
} from './cohort';
import { betaSentence, studentKey } from './forecast-rules';
import { CopyBinaryWriter, int4Field, textField, uuidField } from './copy-binary';
import { PhaseClock } from './phase-clock';
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
  /** Names this process in the chunk table. */
  worker: string;
  log: (message: string) => void;
}

const PHASE: Record<ScoringPart, 1 | 2> = { calibration: 1, backtest: 1, forecast: 2 };

const RESULT_COLUMNS = `run_id, part, seq, student_key, course_code, expected_load, fit,
  predicted_grade, predicted_satisfaction, kin_grade, kin_satisfaction, probability`;

/** What scoring a chunk needs, all kept by the process between chunks. */
interface ChunkInput {
  data: CohortData;
  plan: PartPlan;
  model: Model;
  settings: Settings;
}

/**
 * Does the scoring jobs: the same code in every worker process. Each process reads the cohort
 * from the database itself and builds the models from it (both kept while the term data stays
 * the same), so processes on other machines sharing the database can join a run. A process
 * scores in its own thread: more processes are what finish a run sooner.
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
  private async data(run: RunRow, clock: PhaseClock): Promise<CohortData | null> {
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
      clock.lap('cohort');
    }
    if (this.cohort.stamp !== run.data_stamp) {
      await this.supersede(run.id);
      return null;
    }
    return this.cohort;
  }

  /** The term data changed since the run began: a newer run follows, this one would mix both. */
  private async supersede(runId: string): Promise<void> {
    await this.pool.query(
      `UPDATE scoring_runs SET status = 'superseded', finished_at = now()
       WHERE id = $1 AND status IN ('queued', 'scoring', 'finalising')`,
      [runId],
    );
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

  /**
   * Splits the run into chunks. Counted in SQL, not from the cohort, so it is quick and every
   * worker process reads the cohort at the same time, for its first chunk.
   */
  private async plan(runId: string): Promise<void> {
    const clock = new PhaseClock();
    const run = await this.run(runId);
    if (!run || run.status !== 'queued') return;
    const chunks: { part: ScoringPart; seq: number; first: number; count: number }[] = [];
    const client = await this.pool.connect();
    try {
      const outline = await outlineRun(client, run.term, run.parts);
      clock.lap('outline');
      if (outline.stamp !== run.data_stamp) return await this.supersede(run.id);
      for (const [part, students] of Object.entries(outline.students) as [ScoringPart, number][]) {
        for (let first = 0, seq = 0; first < students; first += run.chunk_size, seq++) {
          chunks.push({ part, seq, first, count: Math.min(run.chunk_size, students - first) });
        }
      }
      await client.query('BEGIN');
      const { rowCount } = await client.query(
        `UPDATE scoring_runs SET status = 'scoring', started_at = now(), chunks_total = $2,
           backtest_term = $3, calibration_term = $4, students = $5
         WHERE id = $1 AND status = 'queued'`,
        [run.id, chunks.length, outline.backtest, outline.calibration, outline.students.forecast],
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
      clock.lap('store');
      await recordPhases(client, run.id, clock, 'plan');
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
    const clock = new PhaseClock();
    const run = await this.run(runId);
    if (!run || run.status !== 'scoring') return;
    const {
      rows: [chunk],
    } = await this.pool.query<{
      first: number;
      count: number;
      status: string;
      phase: number;
      students: number;
    }>(
      `SELECT first, count, status, phase,
         (SELECT max(first + count) FROM scoring_chunks
          WHERE run_id = $1 AND part = $2) AS students
       FROM scoring_chunks WHERE run_id = $1 AND part = $2 AND seq = $3`,
      [runId, part, seq],
    );
    if (!chunk || chunk.status === 'done') return;
    clock.lap('job');
    const data = await this.data(run, clock);
    if (!data) return;
    const plan = this.planFor(data, run, part);
    if (plan.students.length !== chunk.students) {
      throw new Error(
        `The ${part} population read from the cohort (${plan.students.length}) is not the planned one (${chunk.students}).`,
      );
    }
    clock.lap('plan');
    const settings = engineSettings(await this.settingsOf(run.settings_version));
    const model = modelBefore(data, plan.term);
    clock.lap('model');
    const client = await this.pool.connect();
    let phaseDone = false;
    let rows = 0;
    try {
      await client.query('BEGIN');
      // A chunk's rows commit together with its done mark, so a chunk not yet done has none;
      // the lock keeps a second process off it meanwhile.
      const mine = await client.query<{ status: string }>(
        `SELECT status FROM scoring_chunks WHERE run_id = $1 AND part = $2 AND seq = $3
         FOR NO KEY UPDATE`,
        [runId, part, seq],
      );
      if (!mine.rows[0] || mine.rows[0].status === 'done') {
        await client.query('ROLLBACK');
        return;
      }
      clock.lap('store');
      // Rows go to the database while the next students are scored.
      const tally = { rows: 0 };
      await pipeline(
        Readable.from(
          this.scoredRows(run, part, seq, chunk, { data, plan, model, settings }, clock, tally),
        ),
        client.query(
          copyFrom(`COPY scoring_results (${RESULT_COLUMNS}) FROM STDIN (FORMAT binary)`),
        ),
      );
      rows = tally.rows;
      clock.lap('store');
      await client.query(
        `UPDATE scoring_chunks SET status = 'done', worker = $4, rows = $5, scoring_ms = $6,
           phase_ms = $7, finished_at = now()
         WHERE run_id = $1 AND part = $2 AND seq = $3`,
        [
          runId,
          part,
          seq,
          this.options.worker,
          rows,
          Math.round(clock.get('scoring')),
          JSON.stringify(clock.toJSON()),
        ],
      );
      // The run's row lock orders the chunk ends, so exactly one sees its phase complete.
      const locked = await client.query<{ status: string }>(
        `SELECT status FROM scoring_runs WHERE id = $1 FOR NO KEY UPDATE`,
        [runId],
      );
      if (locked.rows[0]?.status !== 'scoring') {
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
    const ms = clock.toJSON();
    this.options.log(
      `Scored ${part} chunk ${seq} of run ${runId}: ${chunk.count} students, ${rows} rows; ms per phase ${JSON.stringify(ms)}.`,
    );
    if (phaseDone) await this.send([{ kind: 'finalise', runId, phase: chunk.phase === 1 ? 1 : 2 }]);
  }

  /**
   * The chunk's students scored one at a time over their own eligible electives, as COPY data:
   * one piece per student, made when the database is ready for more. Counts the rows in `tally`.
   */
  private scoredRows(
    run: RunRow,
    part: ScoringPart,
    seq: number,
    chunk: { first: number; count: number },
    { data, plan, model, settings }: ChunkInput,
    clock: PhaseClock,
    tally: { rows: number },
  ): AsyncGenerator<Buffer> {
    const beta = part === 'forecast' ? run.beta : null;
    const courses = plan.electives.map(textField);
    const prefix = Buffer.concat([uuidField(run.id), textField(part), int4Field(seq)]);
    const index = this.index;
    return (async function* () {
      const out = new CopyBinaryWriter();
      for (let x = chunk.first; x < chunk.first + chunk.count; x++) {
        const pseudonym = plan.students[x];
        const eligible = eligibleElectives(data, index?.get(pseudonym), plan);
        clock.lap('eligibility');
        const [s] = await scoreBatch(
          model,
          {
            students: [pseudonym],
            courses: eligible.map((t) => plan.electives[t]),
            includeTaken: true,
            settings,
          },
          { workers: 0 },
        );
        clock.lap('scoring');
        const load = plan.loads[x];
        const p = beta === null ? null : choiceProbabilities(s.fit, load, beta);
        const key = uuidField(studentKey(pseudonym));
        for (let t = 0; t < eligible.length; t++) {
          out.row(12);
          out.raw(prefix);
          out.raw(key);
          out.raw(courses[eligible[t]]);
          out.float8(load);
          out.float8(s.fit[t]);
          out.float8(s.grade?.value[t]);
          out.float8(s.satisfaction?.value[t]);
          out.int4(s.grade?.kin[t] ?? 0);
          out.int4(s.satisfaction?.kin[t] ?? 0);
          if (p) out.float8(p[t]);
          else out.null();
        }
        tally.rows += eligible.length;
        clock.lap('rows');
        yield out.take();
        // Back here once the database has room for more.
        clock.lap('store');
      }
      out.end();
      yield out.take();
    })();
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
    const clock = new PhaseClock();
    const run = await this.run(runId);
    if (!run || run.status !== 'scoring') return;
    if (phase === 1) return this.finaliseBacktest(run, clock);
    const data = await this.data(run, clock);
    if (data) await this.finaliseForecast(run, data, clock);
  }

  /**
   * Phase 1 ends: beta for the backtest from the term before it (in-sample when there is none),
   * the backtest's per-course forecast, and beta for the forecast from the backtest term.
   */
  private async finaliseBacktest(run: RunRow, clock: PhaseClock): Promise<void> {
    // Only a backtest needs the cohort; without one the forecast chunks go out at once.
    const data = run.backtest_term ? await this.data(run, clock) : null;
    if (run.backtest_term && !data) return;
    let beta = run.beta ?? FALLBACK_BETA;
    let method = betaSentence(beta, null);
    let backtestBeta: number | null = null;
    let backtestMethod: string | null = null;
    const client = await this.pool.connect();
    try {
      await client.query('BEGIN');
      if (run.backtest_term && data) {
        const term = run.backtest_term;
        const actual = this.actual(data, term);
        const bt = await this.partStudents(run.id, 'backtest');
        clock.lap('read');
        const forward = calibrateBeta(bt.students, actual);
        clock.lap('calibration');
        if (run.calibration_term) {
          const cal = await this.partStudents(run.id, 'calibration');
          clock.lap('read');
          backtestBeta = calibrateBeta(cal.students, this.actual(data, run.calibration_term)).beta;
          backtestMethod = betaSentence(backtestBeta, run.calibration_term);
        } else {
          backtestBeta = forward.beta;
          backtestMethod = betaSentence(backtestBeta, term, true);
        }
        clock.lap('calibration');
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
           FROM unnest($2::uuid[], $3::text[], $4::float8[]) AS u(s, c, p)
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
      clock.lap('store');
      await recordPhases(client, run.id, clock, 'finalise 1');
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
    if (rows.length === 0) return this.finalise(run.id, 2);
    await this.send(
      rows.map((r) => ({ kind: 'chunk', runId: run.id, part: 'forecast', seq: r.seq })),
    );
  }

  /** Phase 2 ends: expected demand and variance per elective are sums over the stored rows. */
  private async finaliseForecast(run: RunRow, data: CohortData, clock: PhaseClock): Promise<void> {
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
    clock.lap('sums');
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
           rows = (SELECT coalesce(sum(rows), 0) FROM scoring_chunks WHERE run_id = $1)
         WHERE id = $1 AND status = 'scoring'`,
        [run.id],
      );
      clock.lap('store');
      if (done.rowCount === 1) {
        // Earlier runs of the term keep their per-course figures; their scored rows can go.
        await client.query(
          `DELETE FROM scoring_results WHERE run_id IN (
             SELECT id FROM scoring_runs
             WHERE term = $1 AND id <> $2 AND status IN ('done', 'superseded', 'failed'))`,
          [run.term, run.id],
        );
        clock.lap('cleanup');
      }
      await recordPhases(client, run.id, clock, 'finalise 2');
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

/** Adds a planning or finalising job's milliseconds per phase to the run's, under `job`. */
async function recordPhases(
  client: PoolClient,
  runId: string,
  clock: PhaseClock,
  job: string,
): Promise<void> {
  await client.query(
    `UPDATE scoring_runs SET phase_ms = coalesce(phase_ms, '{}') || $2::jsonb WHERE id = $1`,
    [runId, JSON.stringify(clock.toJSON(`${job}: `))],
  );
}
