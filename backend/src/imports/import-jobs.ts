import { Injectable, Logger, OnApplicationShutdown } from '@nestjs/common';
import PgBoss from 'pg-boss';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';

export const VALIDATE_QUEUE = 'imports-validate';
export const COMMIT_QUEUE = 'imports-commit';

export interface ImportJob {
  importId: string;
  /** Who asked for the commit (commit jobs only). */
  actorId?: string | null;
}

export interface ImportJobHandlers {
  validate(job: ImportJob): Promise<void>;
  commit(job: ImportJob): Promise<void>;
}

/**
 * Background jobs on PostgreSQL (pg-boss, its own schema in the same database):
 * a queued import survives a restart. Jobs are never retried by themselves; a
 * commit that fails is reported, and the registrar decides what comes next.
 */
@Injectable()
export class ImportJobs implements OnApplicationShutdown {
  private readonly logger = new Logger(ImportJobs.name);
  private boss: PgBoss | null = null;
  private readonly workers = new Map<string, string>();

  constructor(@InjectConfig() private readonly config: AppConfig) {}

  async start(handlers: ImportJobHandlers): Promise<void> {
    const db = this.config.database;
    const boss = new PgBoss({
      host: db.host,
      port: db.port,
      database: db.name,
      user: db.user,
      password: db.password,
      schema: 'pgboss',
      application_name: 'kinpath-jobs',
      max: 3,
      schedule: false,
    });
    boss.on('error', (error: Error) => this.logger.error(`Job queue: ${error.message}`));
    await boss.start();
    for (const name of [VALIDATE_QUEUE, COMMIT_QUEUE]) {
      await boss.createQueue(name, { name, retryLimit: 0, expireInSeconds: 3 * 3600 });
    }
    const run =
      (handler: (job: ImportJob) => Promise<void>) => async (jobs: PgBoss.Job<ImportJob>[]) => {
        for (const job of jobs) await handler(job.data);
      };
    const options = { batchSize: 1, pollingIntervalSeconds: 1 };
    this.workers.set(
      VALIDATE_QUEUE,
      await boss.work(VALIDATE_QUEUE, options, run(handlers.validate)),
    );
    this.workers.set(COMMIT_QUEUE, await boss.work(COMMIT_QUEUE, options, run(handlers.commit)));
    this.boss = boss;
  }

  async send(queue: typeof VALIDATE_QUEUE | typeof COMMIT_QUEUE, job: ImportJob): Promise<void> {
    if (!this.boss) throw new Error('The job queue has not started.');
    await this.boss.send(queue, job, { retryLimit: 0 });
    // Wake the local worker now rather than at its next poll.
    const worker = this.workers.get(queue);
    if (worker) this.boss.notifyWorker(worker);
  }

  async onApplicationShutdown(): Promise<void> {
    const boss = this.boss;
    this.boss = null;
    await boss?.stop({ graceful: true, wait: true, timeout: 5000 }).catch(() => undefined);
  }
}
