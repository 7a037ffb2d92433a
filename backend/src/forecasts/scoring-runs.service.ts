import type { ScoringRunStatus, ScoringRunSummary } from '@kinpath/contracts';
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
import { ModelSettingsService } from '../model/model-settings.service';
import { DATA_STAMP_SQL } from './cohort';
import { ScoringQueue } from './scoring-queue';

export interface RunRow {
  id: string;
  term: string;
  settings_version: number;
  reason: string;
  status: ScoringRunStatus;
  chunks_done: number;
  chunks_total: number;
  students: number | null;
  rows: number | null;
  beta: number | null;
  beta_method: string | null;
  beta_backtest: number | null;
  beta_backtest_method: string | null;
  backtest_term: string | null;
  calibration_term: string | null;
  error: string | null;
  created_at: Date;
  finished_at: Date | null;
}

export function toSummary(row: RunRow): ScoringRunSummary {
  return {
    id: row.id,
    term: row.term,
    settingsVersion: Number(row.settings_version),
    reason: row.reason,
    status: row.status,
    chunksDone: row.chunks_done,
    chunksTotal: row.chunks_total,
    progress:
      row.status === 'done' ? 1 : row.chunks_total > 0 ? row.chunks_done / row.chunks_total : 0,
    students: row.students,
    rows: row.rows === null ? null : Number(row.rows),
    beta: row.beta,
    backtestTerm: row.backtest_term,
    error: row.error,
    createdAt: new Date(row.created_at).toISOString(),
    finishedAt: row.finished_at ? new Date(row.finished_at).toISOString() : null,
  };
}

const ACTIVE: ScoringRunStatus[] = ['queued', 'scoring', 'finalising'];

function intFromEnv(name: string, fallback: number): number {
  const raw = process.env[name];
  const value = raw === undefined || raw === '' ? fallback : Number(raw);
  return Number.isInteger(value) && value >= 0 ? value : fallback;
}

/**
 * Cohort scoring runs: one is queued for the next term after every model rebuild (a committed
 * import or rollback) and every settings change, unless one for the same data and settings
 * exists. The server only queues; scoring worker processes do the work. By default the server
 * starts KINPATH_SCORING_PROCESSES of them itself (1; 0 when they run elsewhere).
 */
@Injectable()
export class ScoringRunsService implements OnApplicationBootstrap, OnApplicationShutdown {
  private readonly logger = new Logger(ScoringRunsService.name);
  private readonly queue: ScoringQueue;
  private readonly children = new Set<ChildProcess>();
  private subscriptions: Subscription[] = [];
  private serial: Promise<unknown> = Promise.resolve();
  private stopping = false;
  readonly chunkSize = Math.max(1, intFromEnv('KINPATH_SCORING_CHUNK', 2000));

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    @InjectConfig() config: AppConfig,
    private readonly catalogue: CatalogueService,
    private readonly settings: ModelSettingsService,
    private readonly events: ModelEvents,
  ) {
    this.queue = new ScoringQueue(config.database, (error) =>
      this.logger.error(`Scoring queue: ${error.message}`),
    );
  }

  async onApplicationBootstrap(): Promise<void> {
    await this.queue.start();
    this.subscriptions.push(
      this.events.modelRefreshed$.subscribe((event) => {
        void this.ensureRun(event.importIds.length > 0 ? 'import' : 'start');
      }),
      this.events.settingsChanged$.subscribe((version) => {
        void this.ensureRun('settings', version.version);
      }),
    );
    const processes = intFromEnv('KINPATH_SCORING_PROCESSES', 1);
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
    const entry = join(__dirname, 'scoring-worker.js');
    if (!existsSync(entry)) {
      this.logger.warn(`No scoring worker at ${entry} (build first); runs wait for one.`);
      return;
    }
    const child = fork(entry, [], { env: process.env, stdio: 'inherit' });
    this.children.add(child);
    child.on('exit', (code, signal) => {
      this.children.delete(child);
      if (this.stopping) return;
      this.logger.error(`A scoring worker stopped (${code ?? signal}); starting another.`);
      setTimeout(() => this.startWorker(), 5000).unref();
    });
  }

  /**
   * Queues a run for `term` (default: the next term) unless one for the same term data and
   * settings is queued, running or done; `force` queues one anyway. Calls are serialised.
   */
  ensureRun(
    reason: string,
    settingsVersion?: number,
    term?: string,
    force = false,
  ): Promise<ScoringRunSummary | null> {
    const next = this.serial.then(() => this.ensureRunNow(reason, settingsVersion, term, force));
    this.serial = next.catch((error: Error) =>
      this.logger.error(`Could not queue a scoring run: ${error.message}`),
    );
    return next;
  }

  private async ensureRunNow(
    reason: string,
    settingsVersion: number | undefined,
    requestedTerm: string | undefined,
    force: boolean,
  ): Promise<ScoringRunSummary | null> {
    if (this.stopping) return null;
    const term = requestedTerm ?? (await this.catalogue.terms()).next;
    if (!term) return null;
    const version = settingsVersion ?? (await this.settings.current()).version;
    const [{ stamp }] = (await this.dataSource.query(DATA_STAMP_SQL)) as { stamp: string }[];
    if (!force) {
      const same: RunRow[] = await this.dataSource.query(
        `SELECT * FROM scoring_runs WHERE term = $1 AND settings_version = $2 AND data_stamp = $3
           AND (status = 'done' OR (status = ANY($4) AND created_at > now() - interval '2 hours'))
         ORDER BY created_at DESC LIMIT 1`,
        // A run still unfinished after two hours lost its worker; it no longer holds a new one back.
        [term, version, stamp, ACTIVE],
      );
      if (same[0]) return toSummary(same[0]);
    }
    await this.dataSource.query(
      `UPDATE scoring_runs SET status = 'superseded', finished_at = now()
       WHERE term = $1 AND status = ANY($2)`,
      [term, ACTIVE],
    );
    const [row] = (await this.dataSource.query(
      `INSERT INTO scoring_runs (term, settings_version, data_stamp, reason, parts, chunk_size)
       VALUES ($1, $2, $3, $4, $5, $6) RETURNING *`,
      [term, version, stamp, reason, ['forecast', 'backtest', 'calibration'], this.chunkSize],
    )) as RunRow[];
    await this.queue.send([{ kind: 'plan', runId: row.id }]);
    this.logger.log(`Scoring run ${row.id} queued for ${term} (${reason}).`);
    return toSummary(row);
  }

  async list(limit = 20): Promise<ScoringRunSummary[]> {
    const rows: RunRow[] = await this.dataSource.query(
      `SELECT * FROM scoring_runs ORDER BY created_at DESC LIMIT $1`,
      [limit],
    );
    return rows.map(toSummary);
  }

  /** The latest finished run for the term: the one whose figures are shown. */
  async latestDone(term: string): Promise<RunRow | null> {
    const rows: RunRow[] = await this.dataSource.query(
      `SELECT * FROM scoring_runs WHERE term = $1 AND status = 'done'
       ORDER BY finished_at DESC LIMIT 1`,
      [term],
    );
    return rows[0] ?? null;
  }

  /** The latest finished run whose backtest covers `backtestTerm`. */
  async latestBacktest(backtestTerm: string): Promise<RunRow | null> {
    const rows: RunRow[] = await this.dataSource.query(
      `SELECT * FROM scoring_runs WHERE backtest_term = $1 AND status = 'done'
       ORDER BY finished_at DESC LIMIT 1`,
      [backtestTerm],
    );
    return rows[0] ?? null;
  }

  async pending(term: string): Promise<RunRow | null> {
    const rows: RunRow[] = await this.dataSource.query(
      `SELECT * FROM scoring_runs WHERE term = $1 AND status = ANY($2)
       ORDER BY created_at DESC LIMIT 1`,
      [term, ACTIVE],
    );
    return rows[0] ?? null;
  }
}
