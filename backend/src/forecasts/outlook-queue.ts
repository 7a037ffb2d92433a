import PgBoss from 'pg-boss';
import type { DatabaseConfig } from '../config/config';

export const OUTLOOK_QUEUE = 'forecasts-outlook';

/** One job per run: compute the outlook of the run's term and its backtests. */
export interface OutlookJob {
  runId: string;
}

/**
 * pg-boss in the database's own `pgboss` schema, shared by the server (which only sends) and
 * the outlook worker processes (which only consume), on this machine or others.
 */
export class OutlookQueue {
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
      application_name: 'kinpath-outlook',
      max: 2,
      schedule: false,
      supervise: true,
    });
    boss.on('error', this.onError);
    await boss.start();
    // A failure marks the run failed instead of retrying: the next import, or a registrar,
    // starts a new run.
    await boss.createQueue(OUTLOOK_QUEUE, {
      name: OUTLOOK_QUEUE,
      retryLimit: 0,
      expireInSeconds: 3 * 3600,
    });
    this.boss = boss;
  }

  async send(job: OutlookJob): Promise<void> {
    if (!this.boss) throw new Error('The outlook queue has not started.');
    await this.boss.send(OUTLOOK_QUEUE, job, { retryLimit: 0 });
    if (this.workerId) this.boss.notifyWorker(this.workerId);
  }

  /** Consumes one job at a time; several processes may each call this. */
  async work(handler: (job: OutlookJob) => Promise<void>): Promise<void> {
    if (!this.boss) throw new Error('The outlook queue has not started.');
    this.workerId = await this.boss.work<OutlookJob>(
      OUTLOOK_QUEUE,
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
