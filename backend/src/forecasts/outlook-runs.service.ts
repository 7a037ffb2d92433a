import type { OutlookRunStatus, OutlookRunSummary } from '@kinpath/contracts';
import { Injectable, Logger, OnApplicationBootstrap, OnApplicationShutdown } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import { fork, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import type { Subscription } from 'rxjs';
import type { DataSource } from 'typeorm';
import { CatalogueService } from '../catalogue/catalogue.service';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { ModelEvents } from '../model/model-events';
import { DATA_STAMP_SQL } from './cohort';
import { OutlookQueue } from './outlook-queue';
import type { RunSummary } from './outlook-runner';

export interface RunRow {
  id: string;
  term: string;
  reason: string;
  status: OutlookRunStatus;
  steps_done: number;
  steps_total: number;
  students: number | null;
  summary: RunSummary | null;
  error: string | null;
  created_at: Date;
  finished_at: Date | null;
}

export function toSummary(row: RunRow): OutlookRunSummary {
  return {
    id: row.id,
    term: row.term,
    reason: row.reason,
    status: row.status,
    stepsDone: row.steps_done,
    stepsTotal: row.steps_total,
    progress:
      row.status === 'done' ? 1 : row.steps_total > 0 ? row.steps_done / row.steps_total : 0,
    students: row.students,
    error: row.error,
    createdAt: new Date(row.created_at).toISOString(),
    finishedAt: row.finished_at ? new Date(row.finished_at).toISOString() : null,
  };
}

const ACTIVE: OutlookRunStatus[] = ['queued', 'computing'];

function intFromEnv(name: string, fallback: number): number {
  const raw = process.env[name];
  const value = raw === undefined || raw === '' ? fallback : Number(raw);
  return Number.isInteger(value) && value >= 0 ? value : fallback;
}

/**
 * Outlook runs: one is queued for the next term after every committed or rolled-back import
 * (the model's refresh event) and at start, unless one for the same term data exists, and on
 * request. The server only queues; outlook worker processes compute. By default the server
 * starts KINPATH_OUTLOOK_PROCESSES of them itself (1; 0 when they run elsewhere).
 */
@Injectable()
export class OutlookRunsService implements OnApplicationBootstrap, OnApplicationShutdown {
  private readonly logger = new Logger(OutlookRunsService.name);
  private readonly queue: OutlookQueue;
  private readonly children = new Set<ChildProcess>();
  private subscriptions: Subscription[] = [];
  private serial: Promise<unknown> = Promise.resolve();
  private stopping = false;

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    @InjectConfig() config: AppConfig,
    private readonly catalogue: CatalogueService,
    private readonly events: ModelEvents,
  ) {
    this.queue = new OutlookQueue(config.database, (error) =>
      this.logger.error(`Outlook queue: ${error.message}`),
    );
  }

  async onApplicationBootstrap(): Promise<void> {
    await this.queue.start();
    // The import hook: every commit or rollback refreshes the model, then the outlook.
    this.subscriptions.push(
      this.events.modelRefreshed$.subscribe((event) => {
        void this.ensureRun(event.importIds.length > 0 ? 'import' : 'start');
      }),
    );
    const processes = intFromEnv('KINPATH_OUTLOOK_PROCESSES', 1);
    for (let i = 0; i < processes; i++) this.startWorker();
    void this.ensureRun('start');
  }

  async onApplicationShutdown(): Promise<void> {
    this.stopping = true;
    for (const s of this.subscriptions) s.unsubscribe();
    for (const child of this.children) child.kill('SIGTERM');
    await this.queue.stop();
  }

  private startWorker(): void {
    const entry = join(__dirname, 'outlook-worker.js');
    if (!existsSync(entry)) {
      this.logger.warn(`No outlook worker at ${entry} (build first); runs wait for one.`);
      return;
    }
    const child = fork(entry, [], { env: process.env, stdio: 'inherit' });
    this.children.add(child);
    child.on('exit', (code, signal) => {
      this.children.delete(child);
      if (this.stopping) return;
      this.logger.error(`An outlook worker stopped (${code ?? signal}); starting another.`);
      setTimeout(() => this.startWorker(), 5000).unref();
    });
  }

  /**
   * Queues a run for `term` (default: the next term) unless one for the same term data is
   * queued, running or done; `force` queues one anyway. Calls are serialised.
   */
  ensureRun(reason: string, term?: string, force = false): Promise<OutlookRunSummary | null> {
    const next = this.serial.then(() => this.ensureRunNow(reason, term, force));
    this.serial = next.catch((error: Error) =>
      this.logger.error(`Could not queue an outlook run: ${error.message}`),
    );
    return next;
  }

  private async ensureRunNow(
    reason: string,
    requestedTerm: string | undefined,
    force: boolean,
  ): Promise<OutlookRunSummary | null> {
    if (this.stopping) return null;
    const term = requestedTerm ?? (await this.catalogue.terms()).next;
    if (!term) return null;
    const [{ stamp }] = (await this.dataSource.query(DATA_STAMP_SQL)) as { stamp: string }[];
    if (!force) {
      const same: RunRow[] = await this.dataSource.query(
        `SELECT * FROM outlook_runs WHERE term = $1 AND data_stamp = $2
           AND (status = 'done' OR (status = ANY($3) AND created_at > now() - interval '2 hours'))
         ORDER BY created_at DESC LIMIT 1`,
        // A run still unfinished after two hours lost its worker; it no longer holds a new one back.
        [term, stamp, ACTIVE],
      );
      if (same[0]) return toSummary(same[0]);
    }
    await this.dataSource.query(
      `UPDATE outlook_runs SET status = 'superseded', finished_at = now()
       WHERE term = $1 AND status = ANY($2)`,
      [term, ACTIVE],
    );
    const [row] = (await this.dataSource.query(
      `INSERT INTO outlook_runs (term, data_stamp, reason) VALUES ($1, $2, $3) RETURNING *`,
      [term, stamp, reason],
    )) as RunRow[];
    await this.queue.send({ runId: row.id });
    this.logger.log(`Outlook run ${row.id} queued for ${term} (${reason}).`);
    return toSummary(row);
  }

  async list(limit = 20): Promise<OutlookRunSummary[]> {
    const rows: RunRow[] = await this.dataSource.query(
      `SELECT * FROM outlook_runs ORDER BY created_at DESC LIMIT $1`,
      [limit],
    );
    return rows.map(toSummary);
  }

  /** The latest finished run for the term: the one whose figures are shown. */
  async latestDone(term: string): Promise<RunRow | null> {
    const rows: RunRow[] = await this.dataSource.query(
      `SELECT * FROM outlook_runs WHERE term = $1 AND status = 'done'
       ORDER BY finished_at DESC LIMIT 1`,
      [term],
    );
    return rows[0] ?? null;
  }

  async pending(term: string): Promise<RunRow | null> {
    const rows: RunRow[] = await this.dataSource.query(
      `SELECT * FROM outlook_runs WHERE term = $1 AND status = ANY($2)
       ORDER BY created_at DESC LIMIT 1`,
      [term, ACTIVE],
    );
    return rows[0] ?? null;
  }
}
