import { Injectable, Logger, OnApplicationShutdown } from '@nestjs/common';
import PgBoss from 'pg-boss';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';

export const EVALUATION_QUEUE = 'model-evaluations';

export interface EvaluationJob {
  evaluationId: string;
}

/**
 * The backtest queue (pg-boss, in the same schema as the import jobs): a queued
 * backtest survives a restart. One at a time in this process, and never
 * retried by itself: a backtest is cheap to ask for again, and the machine is shared
 * with the advising model.
 */
@Injectable()
export class EvaluationJobs implements OnApplicationShutdown {
  private readonly logger = new Logger(EvaluationJobs.name);
  private boss: PgBoss | null = null;
  private worker: string | null = null;

  constructor(@InjectConfig() private readonly config: AppConfig) {}

  async start(handler: (job: EvaluationJob) => Promise<void>): Promise<void> {
    const db = this.config.database;
    const boss = new PgBoss({
      host: db.host,
      port: db.port,
      database: db.name,
      user: db.user,
      password: db.password,
      schema: 'pgboss',
      application_name: 'kinpath-backtests',
      max: 2,
      schedule: false,
      supervise: false,
    });
    boss.on('error', (error: Error) => this.logger.error(`Backtest queue: ${error.message}`));
    await boss.start();
    await boss.createQueue(EVALUATION_QUEUE, {
      name: EVALUATION_QUEUE,
      retryLimit: 0,
      expireInSeconds: 3600,
    });
    this.worker = await boss.work<EvaluationJob>(
      EVALUATION_QUEUE,
      { batchSize: 1, pollingIntervalSeconds: 2 },
      async (jobs) => {
        for (const job of jobs) await handler(job.data);
      },
    );
    this.boss = boss;
  }

  async send(job: EvaluationJob): Promise<void> {
    if (!this.boss) throw new Error('The backtest queue has not started.');
    await this.boss.send(EVALUATION_QUEUE, job, { retryLimit: 0 });
    // Wake the local worker now rather than at its next poll.
    if (this.worker) this.boss.notifyWorker(this.worker);
  }

  async onApplicationShutdown(): Promise<void> {
    const boss = this.boss;
    this.boss = null;
    await boss?.stop({ graceful: true, wait: true, timeout: 5000 }).catch(() => undefined);
  }
}
