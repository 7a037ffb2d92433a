import { termFromOrdinal, termOrdinal } from '@kinpath/contracts';
import { outlook as engine } from '@kinpath/engine';
import type { Pool } from 'pg';
import { loadCohort, toOutlookInput } from './cohort';
import { driversSentence } from './forecast-rules';
import type { OutlookJob } from './outlook-queue';
import { PhaseClock } from './phase-clock';

export interface RunnerOptions {
  /** Names this process in the log. */
  worker: string;
  log: (message: string) => void;
}

/** A backtest term's figures, as kept in the run's summary. */
export interface TermFigures {
  term: string;
  students: number;
  modelWape: number | null;
  naiveWape: number | null;
  sameTermWape: number | null;
  takeUpWape: number | null;
  coverage: number | null;
  q: number;
}

/** What a finished run keeps besides its per-course rows. */
export interface RunSummary {
  /** The reported backtests, oldest first. */
  terms: TermFigures[];
  /** Earlier backtests computed only to calibrate the interval of the reported ones. */
  calibration: TermFigures[];
  /** The live forecast's fit: θ in method.md's order, its standard errors, q and its terms. */
  theta: number[];
  standardErrors: (number | null)[];
  influence: number[];
  load: number[] | null;
  q: number | null;
  qTerms: string[];
  trainingTerms: string[];
  drivers: string;
  phaseMs: Record<string, number>;
}

interface RunRow {
  id: string;
  term: string;
  data_stamp: string;
  status: string;
}

const finite = (x: number) => (Number.isFinite(x) ? x : null);

function figures(t: engine.TermOutlook): TermFigures {
  return {
    term: termFromOrdinal(t.term),
    students: t.students,
    modelWape: t.modelWape,
    naiveWape: t.naiveWape,
    sameTermWape: t.sameTermWape,
    takeUpWape: t.takeUpWape,
    coverage: t.coverage,
    q: t.q,
  };
}

/**
 * Computes outlook runs: reads the term data in one snapshot, runs the engine's outlook for
 * the run's term with its backtests, and stores one row per offered elective and term.
 * Progress is written after each term so the screen can show it.
 */
export class OutlookRunner {
  constructor(
    private readonly pool: Pool,
    private readonly options: RunnerOptions,
  ) {}

  async handle(job: OutlookJob): Promise<void> {
    try {
      await this.compute(job.runId);
    } catch (error) {
      const message = (error as Error).message;
      this.options.log(`Outlook run ${job.runId} failed: ${message}`);
      await this.pool.query(
        `UPDATE outlook_runs SET status = 'failed', error = $2, finished_at = now()
         WHERE id = $1 AND status IN ('queued', 'computing')`,
        [job.runId, message.slice(0, 500)],
      );
    }
  }

  private async compute(runId: string): Promise<void> {
    const clock = new PhaseClock();
    const { rows } = await this.pool.query<RunRow>(
      `UPDATE outlook_runs SET status = 'computing', started_at = now()
       WHERE id = $1 AND status = 'queued' RETURNING id, term, data_stamp, status`,
      [runId],
    );
    const run = rows[0];
    if (!run) return;
    const client = await this.pool.connect();
    let cohort;
    try {
      cohort = await loadCohort(client);
    } finally {
      client.release();
    }
    clock.lap('read');
    if (cohort.stamp !== run.data_stamp) {
      // The term data moved on since the run was queued: a newer run follows.
      await this.pool.query(
        `UPDATE outlook_runs SET status = 'superseded', finished_at = now()
         WHERE id = $1 AND status = 'computing'`,
        [run.id],
      );
      return;
    }
    const input = toOutlookInput(cohort);
    clock.lap('prepare');
    const steps = engine.outlookSteps(input.data, termOrdinal(run.term), input.active);
    let result: engine.OutlookResult;
    // Time per step: each backtest term, then the live forecast.
    let current = 'prepare';
    for (;;) {
      const step = steps.next();
      clock.lap(current);
      if (step.done) {
        result = step.value;
        break;
      }
      const backtest = /^backtest (\d+)$/.exec(step.value.step);
      current = backtest ? `backtest ${termFromOrdinal(Number(backtest[1]))}` : step.value.step;
      await this.pool.query(
        `UPDATE outlook_runs SET steps_done = $2, steps_total = $3, students = $4
         WHERE id = $1 AND status = 'computing'`,
        [run.id, step.value.done, step.value.total, input.active.length],
      );
    }
    const parts: [string, engine.TermOutlook][] = [
      ...result.calibration.map((t): [string, engine.TermOutlook] => ['calibration', t]),
      ...result.backtests.map((t): [string, engine.TermOutlook] => ['backtest', t]),
    ];
    if (result.forecast) parts.push(['forecast', result.forecast]);
    const live = result.forecast;
    const summary: RunSummary = {
      terms: result.backtests.map(figures),
      calibration: result.calibration.map(figures),
      theta: live ? [...live.theta] : [],
      standardErrors: live ? [...live.standardErrors].map(finite) : [],
      influence: live ? [...live.influence] : [],
      load: live?.load ? [...live.load] : null,
      q: live?.q ?? null,
      qTerms: live ? [...live.qTerms].map(termFromOrdinal) : [],
      trainingTerms: live ? [...live.trainingTerms].map(termFromOrdinal) : [],
      drivers: live ? driversSentence(live.theta, live.influence) : '',
      phaseMs: {},
    };
    const store = await this.pool.connect();
    try {
      await store.query('BEGIN');
      for (const [part, t] of parts) {
        const n = t.courses.length;
        if (n === 0) continue;
        await store.query(
          `INSERT INTO outlook_courses (run_id, term, part, course_code, expected, variance, low,
             high, no_history, actual, naive, naive_term, same_term, take_up)
           SELECT $1, $2, $3, * FROM unnest($4::text[], $5::float8[], $6::float8[], $7::float8[],
             $8::float8[], $9::bool[], $10::int[], $11::float8[], $12::text[], $13::float8[],
             $14::float8[])`,
          [
            run.id,
            termFromOrdinal(t.term),
            part,
            Array.from(t.courses, (c) => input.courses[c]),
            Array.from(t.expected),
            Array.from(t.variance),
            Array.from(t.low),
            Array.from(t.high),
            Array.from(t.noHistory, (x) => x === 1),
            t.actual ? Array.from(t.actual) : new Array<null>(n).fill(null),
            Array.from(t.naive),
            Array.from(t.naiveTerm, (x) => (x < 0 ? null : termFromOrdinal(x))),
            Array.from(t.sameTerm),
            Array.from(t.takeUp),
          ],
        );
      }
      clock.lap('store');
      summary.phaseMs = clock.toJSON();
      const done = await store.query(
        `UPDATE outlook_runs SET status = 'done', finished_at = now(), steps_done = steps_total,
           summary = $2
         WHERE id = $1 AND status = 'computing'`,
        [run.id, JSON.stringify(summary)],
      );
      if (done.rowCount === 1) {
        // Earlier runs of the term are no longer shown; their rows can go.
        await store.query(
          `DELETE FROM outlook_courses WHERE run_id IN (
             SELECT id FROM outlook_runs WHERE term = $1 AND id <> $2
               AND status IN ('done', 'superseded', 'failed'))`,
          [run.term, run.id],
        );
      }
      await store.query('COMMIT');
    } catch (error) {
      await store.query('ROLLBACK').catch(() => undefined);
      throw error;
    } finally {
      store.release();
    }
    this.options.log(
      `Outlook run ${run.id} for ${run.term} is done (${this.options.worker}); ms per phase ${JSON.stringify(summary.phaseMs)}.`,
    );
  }
}
