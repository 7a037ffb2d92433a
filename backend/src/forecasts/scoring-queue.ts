import PgBoss from 'pg-boss';
import type { DatabaseConfig } from '../config/config';
import type { ScoringPart } from './cohort';

export const SCORING_QUEUE = 'forecasts-scoring';

/**
 * The jobs of one scoring run: `plan` reads the cohort and splits it into chunks; each `chunk`
 * scores a slice of one part's students; `finalise` ends a phase (phase 1: backtest and beta
 * calibration; phase 2: the forecast itself).
 */
export type ScoringJob =
  | { kind: 'plan'; runId: string }
  | { kind: 'chunk'; runId: string; part: ScoringPart; seq: number }
  | { kind: 'finalise'; runId: string; phase: 1 | 2 };

/**
 * pg-boss in the database's own `pgboss` schema, shared by the server (which only sends) and
 * the scoring worker processes (which only consume), on this machine or others.
 */
export class ScoringQueue {
  private boss: PgBoss | null = null;
  private workerId: string | null = null;

  constructor(
    private readonly db: DatabaseConfig,
    private readonly onError: (error: Error) => void,
  ) {}

  async start(): Promise<void> {
    const boss = new PgBoss({
      host: this.db.host,
      port: this.db.port,
      database: this.db.name,
      user: this.db.user,
      password: this.db.password,
      schema: 'pgboss',
      application_name: 'kinpath-scoring',
      max: 2,
      schedule: false,
      supervise: true,
    });
    boss.on('error', this.onError);
    await boss.start();
    // A chunk's rows commit with its done mark, so a chunk is never stored twice; still, a failure
    // marks the run failed instead of retrying: the next import or settings change, or a
    // registrar, starts a new run.
    await boss.createQueue(SCORING_QUEUE, {
      name: SCORING_QUEUE,
      retryLimit: 0,
      expireInSeconds: 3 * 3600,
    });
    this.boss = boss;
  }

  async send(jobs: ScoringJob[]): Promise<void> {
    if (!this.boss) throw new Error('The scoring queue has not started.');
    if (jobs.length === 0) return;
    await this.boss.insert(jobs.map((data) => ({ name: SCORING_QUEUE, data, retryLimit: 0 })));
    if (this.workerId) this.boss.notifyWorker(this.workerId);
  }

  /** Consumes one job at a time; several processes may each call this. */
  async work(handler: (job: ScoringJob) => Promise<void>): Promise<void> {
    if (!this.boss) throw new Error('The scoring queue has not started.');
    this.workerId = await this.boss.work<ScoringJob>(
      SCORING_QUEUE,
      { batchSize: 1, pollingIntervalSeconds: 0.5 },
      async (jobs) => {
        for (const job of jobs) await handler(job.data);
      },
    );
  }

  async stop(): Promise<void> {
    const boss = this.boss;
    this.boss = null;
    await boss?.stop({ graceful: true, wait: true, timeout: 10_000 }).catch(() => undefined);
  }
}
