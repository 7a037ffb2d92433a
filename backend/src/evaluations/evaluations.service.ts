import type {
  EvaluationAccepted,
  EvaluationDepartmentResult,
  EvaluationDetail,
  EvaluationResult,
  EvaluationStatus,
  EvaluationSummary,
  ModelSettings,
} from '@kinpath/contracts';
import { configurationName, termOrdinal } from '@kinpath/contracts';
import {
  BadRequestException,
  Injectable,
  Logger,
  NotFoundException,
  OnApplicationBootstrap,
} from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { ClientBase } from 'pg';
import type { DataSource } from 'typeorm';
import type { AuditAction } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import { CatalogueService } from '../catalogue/catalogue.service';
import { completeSettings, ModelSettingsService } from '../model/model-settings.service';
import { ModelService } from '../model/model.service';
import { termSortKey } from '../model/term-keys';
import type { User } from '../users/entities/user.entity';
import type { BacktestInput } from './backtest';
import { runBacktestInWorker } from './backtest-runner';
import type { CreateEvaluationDto } from './dto/create-evaluation.dto';
import { EvaluationJobs, type EvaluationJob } from './evaluation-jobs';

/** Audit actions of backtests; detail holds settings and counts, never student data. */
export const EVALUATION_AUDIT = {
  requested: 'model.evaluation_requested',
  finished: 'model.evaluation_finished',
  failed: 'model.evaluation_failed',
} as const;

type Actor = Pick<User, 'id' | 'email'>;
type NamedSettings = ModelSettings & { name: string };

interface EvaluationRow {
  id: string;
  status: EvaluationStatus;
  progress: number;
  holdout_term: string;
  configurations: NamedSettings[];
  settings_version: number | null;
  latest_import_id: string | null;
  latest_import_at: Date | null;
  records: number | null;
  students: number | null;
  message: string | null;
  email: string | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
  results?: EvaluationResult[] | null;
  by_department?: EvaluationDepartmentResult[] | null;
}

const SUMMARY_COLUMNS = `e.id, e.status, e.progress, e.holdout_term, e.configurations,
  e.settings_version, e.latest_import_id, e.latest_import_at, e.records, e.students, e.message,
  u.email, e.created_at, e.started_at, e.finished_at`;
const FROM = `FROM model_evaluations e LEFT JOIN users u ON u.id = e.created_by`;

const iso = (value: Date | null) => (value === null ? null : new Date(value).toISOString());

function toSummary(row: EvaluationRow): EvaluationSummary {
  return {
    id: row.id,
    status: row.status,
    progress: Number(row.progress),
    holdoutTerm: row.holdout_term,
    configurations: row.configurations,
    settingsVersion: row.settings_version === null ? null : Number(row.settings_version),
    dataState: {
      latestImportId: row.latest_import_id,
      latestImportAt: iso(row.latest_import_at),
      records: row.records,
      students: row.students,
    },
    createdAt: iso(row.created_at) as string,
    createdBy: row.email,
    startedAt: iso(row.started_at),
    finishedAt: iso(row.finished_at),
    message: row.message,
  };
}

/** Progress is written at most this often; a backtest has a handful of steps. */
const PROGRESS_INTERVAL_MS = 500;
/** The data loaded counts as this share of the work; the engine's steps share the rest. */
const LOADED_SHARE = 0.1;

/**
 * Backtests: the engine's time-holdout evaluation of up to eight
 * configurations on the current term data, as a background job in a worker
 * thread. Reads the term data as the model does and never touches the model in force.
 */
@Injectable()
export class EvaluationsService implements OnApplicationBootstrap {
  private readonly logger = new Logger(EvaluationsService.name);

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly audit: AuditService,
    private readonly jobs: EvaluationJobs,
    private readonly model: ModelService,
    private readonly settings: ModelSettingsService,
    private readonly catalogue: CatalogueService,
  ) {}

  async onApplicationBootstrap(): Promise<void> {
    // A backtest the server stopped in the middle of is not resumed: its worker is gone.
    const stopped = await this.returning<{ id: string }>(
      `UPDATE model_evaluations SET status = 'failed', finished_at = now(),
         message = 'The server stopped during this backtest; run it again.'
       WHERE status = 'running' RETURNING id`,
    );
    for (const row of stopped) this.logger.warn(`Backtest ${row.id} was interrupted by a restart.`);
    await this.jobs.start((job) => this.run(job));
  }

  async create(dto: CreateEvaluationDto, actor: Actor): Promise<EvaluationAccepted> {
    const holdoutTerm = await this.holdoutTerm(dto.holdoutTerm);
    const configurations: NamedSettings[] = dto.configurations.map((c, index) => ({
      ...completeSettings(c),
      name: configurationName(index, c.name),
    }));
    const names = new Set(configurations.map((c) => c.name));
    if (names.size !== configurations.length) {
      throw new BadRequestException('Each configuration needs a name of its own.');
    }
    const version = (await this.settings.current()).version;
    const id = await this.dataSource.transaction(async (manager) => {
      const rows: { id: string }[] = await manager.query(
        `INSERT INTO model_evaluations (holdout_term, configurations, settings_version, created_by)
         VALUES ($1, $2::jsonb, $3, $4) RETURNING id`,
        [holdoutTerm, JSON.stringify(configurations), version, actor.id],
      );
      await this.audit.record(
        {
          actor,
          action: EVALUATION_AUDIT.requested as unknown as AuditAction,
          target: `model_evaluation:${rows[0].id}`,
          detail: { holdoutTerm, settingsVersion: version, configurations },
        },
        manager,
      );
      return rows[0].id;
    });
    try {
      await this.jobs.send({ evaluationId: id });
    } catch (error) {
      await this.fail(id, `The backtest could not be queued: ${(error as Error).message}`);
      throw error;
    }
    return { id };
  }

  async list(): Promise<EvaluationSummary[]> {
    const rows: EvaluationRow[] = await this.dataSource.query(
      `SELECT ${SUMMARY_COLUMNS} ${FROM} ORDER BY e.created_at DESC LIMIT 100`,
    );
    return rows.map(toSummary);
  }

  async get(id: string): Promise<EvaluationDetail> {
    const rows: EvaluationRow[] = await this.dataSource.query(
      `SELECT ${SUMMARY_COLUMNS}, e.results, e.by_department ${FROM} WHERE e.id = $1`,
      [id],
    );
    if (!rows[0]) throw new NotFoundException(`There is no backtest ${id}.`);
    return {
      ...toSummary(rows[0]),
      results: rows[0].results ?? [],
      byDepartment: rows[0].by_department ?? [],
    };
  }

  /** The asked term, or the last completed one; it needs records, and records before it to learn from. */
  private async holdoutTerm(asked: string | undefined): Promise<string> {
    const { terms, current } = await this.catalogue.terms();
    const withRecords = terms.filter((t) => t.records > 0);
    const term = asked ?? current;
    if (!term) throw new BadRequestException('There is no term data to backtest yet.');
    if (!withRecords.some((t) => t.term === term)) {
      throw new BadRequestException(
        `holdoutTerm ${term} has no records; choose one of ${withRecords.map((t) => t.term).join(', ')}.`,
      );
    }
    if (!withRecords.some((t) => termOrdinal(t.term) < termOrdinal(term))) {
      throw new BadRequestException(
        `holdoutTerm ${term} is the first term with records: there is nothing earlier to learn from.`,
      );
    }
    return term;
  }

  private async run({ evaluationId: id }: EvaluationJob): Promise<void> {
    const started = Date.now();
    const claimed = await this.returning<EvaluationRow>(
      `UPDATE model_evaluations SET status = 'running', started_at = now(), progress = 0
       WHERE id = $1 AND status = 'queued' RETURNING holdout_term, configurations`,
      [id],
    );
    if (!claimed[0]) return; // Gone, or already run.
    try {
      const input = await this.load(id, claimed[0].holdout_term, claimed[0].configurations);
      await this.setProgress(id, LOADED_SHARE);
      let lastWrite = 0;
      const output = await runBacktestInWorker(input, (done, total) => {
        const now = Date.now();
        if (done < total && now - lastWrite < PROGRESS_INTERVAL_MS) return;
        lastWrite = now;
        void this.setProgress(id, LOADED_SHARE + (1 - LOADED_SHARE) * (done / total) * 0.99);
      });
      await this.dataSource.query(
        `UPDATE model_evaluations SET status = 'finished', progress = 1, finished_at = now(),
           results = $2::jsonb, by_department = $3::jsonb
         WHERE id = $1`,
        [id, JSON.stringify(output.results), JSON.stringify(output.byDepartment)],
      );
      await this.audit.record({
        actor: null,
        action: EVALUATION_AUDIT.finished as unknown as AuditAction,
        target: `model_evaluation:${id}`,
        detail: { ms: Date.now() - started, results: output.results.length },
      });
      this.logger.log(`Backtest ${id} finished in ${Date.now() - started} ms.`);
    } catch (error) {
      this.logger.error(`Backtest ${id} failed: ${(error as Error).message}`);
      await this.fail(id, `The backtest failed: ${(error as Error).message}`);
    }
  }

  /** The term data as the model reads it, and the latest import as the data state it stands for. */
  private async load(
    id: string,
    holdoutTerm: string,
    configurations: NamedSettings[],
  ): Promise<BacktestInput> {
    const data = await this.model.readTermData(async (client: ClientBase) => {
      const { rows } = await client.query<{ id: string; at: Date }>(
        `SELECT id, greatest(committed_at, rolled_back_at) AS at FROM imports
         WHERE status IN ('committed', 'rolled_back')
         ORDER BY greatest(committed_at, rolled_back_at) DESC NULLS LAST, created_at DESC
         LIMIT 1`,
      );
      return rows[0] ?? null;
    });
    const departments: Record<string, string> = {};
    for (const [code, course] of data.courses) departments[code] = course.department;
    const students = new Set(data.records.students).size;
    await this.dataSource.query(
      `UPDATE model_evaluations SET latest_import_id = $2, latest_import_at = $3,
         records = $4, students = $5 WHERE id = $1`,
      [
        id,
        data.alongside?.id ?? null,
        data.alongside?.at ?? null,
        data.records.students.length,
        students,
      ],
    );
    return {
      records: data.records,
      scales: data.scales,
      holdoutKey: termSortKey(holdoutTerm),
      configurations,
      departments,
    };
  }

  /** Rows of an UPDATE … RETURNING, whichever shape the driver answers with. */
  private async returning<T>(sql: string, params?: unknown[]): Promise<T[]> {
    const result: unknown = await this.dataSource.query(sql, params);
    if (Array.isArray(result) && result.length === 2 && Array.isArray(result[0])) {
      return result[0] as T[];
    }
    return result as T[];
  }

  private async setProgress(id: string, progress: number): Promise<void> {
    await this.dataSource
      .query(
        `UPDATE model_evaluations SET progress = greatest(progress, $2) WHERE id = $1 AND status = 'running'`,
        [id, Math.min(1, Math.max(0, progress))],
      )
      .catch((error: Error) => this.logger.warn(`Backtest ${id} progress: ${error.message}`));
  }

  private async fail(id: string, message: string): Promise<void> {
    await this.dataSource.query(
      `UPDATE model_evaluations SET status = 'failed', finished_at = now(), message = $2
       WHERE id = $1`,
      [id, message.slice(0, 1000)],
    );
    await this.audit.record({
      actor: null,
      action: EVALUATION_AUDIT.failed as unknown as AuditAction,
      target: `model_evaluation:${id}`,
      detail: { message: message.slice(0, 1000) },
    });
  }
}
