import {
  BadRequestException,
  ConflictException,
  Injectable,
  Logger,
  NotFoundException,
  OnApplicationBootstrap,
} from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import { readdir, rename } from 'node:fs/promises';
import { join } from 'node:path';
import type {
  ImportAccepted,
  ImportKind,
  ImportMapping,
  ImportPreview,
  ImportRejection,
  ImportSummary,
  SavedImportMapping,
} from '@kinpath/contracts';
import { IMPORT_FIELDS, IMPORT_KINDS } from '@kinpath/contracts';
import type { ClientBase } from 'pg';
import type { DataSource, EntityManager, QueryRunner } from 'typeorm';
import type { AuditAction } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { loadGradeScale } from '../grade-scale/grade-scale.model';
import { PseudonymService } from '../pseudonym/pseudonym.service';
import type { User } from '../users/entities/user.entity';
import { acceptedPath, removeQuietly, sha256OfFile, uploadPath, uploadsDir } from './import-files';
import { COMMIT_QUEUE, ImportJobs, VALIDATE_QUEUE, type ImportJob } from './import-jobs';
import { IMPORT_SELECT, toSummary, type ImportRow } from './import-row';
import {
  commitRows,
  rederiveGradePoints,
  rollbackBlockers,
  rollbackRows,
  TERM_DATA_LOCK,
} from './term-data-writer';
import { TermDataEvents } from './term-data-events';
import {
  csvParser,
  detectDelimiter,
  headerKey,
  readHeaderLine,
  reportCell,
} from './validation/csv-format';
import { validateFile, resolveColumns } from './validation/validate-file';

/** Audit actions of the import feature; detail never holds a student number. */
export const IMPORT_AUDIT = {
  uploaded: 'import.uploaded',
  committed: 'import.committed',
  rolledBack: 'import.rolled_back',
} as const;

type Actor = Pick<User, 'id' | 'email'>;

export interface UploadedFile {
  path: string;
  originalname: string;
  size: number;
}

@Injectable()
export class ImportsService implements OnApplicationBootstrap {
  private readonly logger = new Logger(ImportsService.name);

  constructor(
    @InjectConfig() private readonly config: AppConfig,
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly pseudonyms: PseudonymService,
    private readonly audit: AuditService,
    private readonly jobs: ImportJobs,
    private readonly events: TermDataEvents,
  ) {}

  async onApplicationBootstrap(): Promise<void> {
    await this.recoverInterrupted();
    await this.jobs.start({
      validate: (job) => this.runValidation(job),
      commit: (job) => this.runCommit(job),
    });
  }

  /**
   * A server stopped mid-validation or mid-commit: the commit's transaction never
   * completed, so the live tables are as before; say so in the history.
   */
  async recoverInterrupted(): Promise<void> {
    const rows: { id: string; status: string }[] = await this.returning(
      `UPDATE imports SET status = 'failed', progress_phase = NULL,
         message = CASE status
           WHEN 'committing' THEN 'The server stopped during the commit; nothing of this import was written. Commit it again by uploading the file again.'
           ELSE 'The server stopped during validation; upload the file again.' END
       WHERE status IN ('validating', 'committing') RETURNING id, status`,
    );
    const dir = uploadsDir(this.config.dataDir);
    for (const name of await readdir(dir)) {
      if (name.endsWith('.incoming')) await removeQuietly(join(dir, name));
    }
    for (const row of rows) {
      this.logger.warn(`Import ${row.id} was interrupted by a restart and is marked failed.`);
      await removeQuietly(uploadPath(this.config.dataDir, row.id));
      await removeQuietly(acceptedPath(this.config.dataDir, row.id));
    }
  }

  // ---- upload and preview -------------------------------------------------

  async upload(
    file: UploadedFile | undefined,
    kind: ImportKind,
    mappingJson: string | undefined,
    commit: boolean,
    actor: Actor,
  ): Promise<ImportAccepted> {
    if (!file) throw new BadRequestException('Send the CSV file in the multipart field `file`.');
    try {
      const mapping = this.parseMapping(kind, mappingJson);
      const sha256 = await sha256OfFile(file.path);
      const earlier = await this.liveImportOf(sha256);
      if (earlier) throw this.duplicate(earlier);
      let id: string;
      try {
        const rows: { id: string }[] = await this.dataSource.query(
          `INSERT INTO imports (kind, status, file_name, file_sha256, file_bytes, mapping,
             commit_requested, created_by)
           VALUES ($1, 'queued', $2, $3, $4, $5, $6, $7) RETURNING id`,
          [
            kind,
            file.originalname.slice(0, 255),
            sha256,
            file.size,
            mapping ? JSON.stringify(mapping) : null,
            commit,
            actor.id,
          ],
        );
        id = rows[0].id;
      } catch (error) {
        const race =
          (error as { code?: string }).code === '23505' && (await this.liveImportOf(sha256));
        if (race) throw this.duplicate(race);
        throw error;
      }
      await rename(file.path, uploadPath(this.config.dataDir, id));
      await this.record(actor, IMPORT_AUDIT.uploaded, id, {
        kind,
        fileName: file.originalname,
        bytes: file.size,
        sha256,
        commitRequested: commit,
      });
      try {
        await this.jobs.send(VALIDATE_QUEUE, { importId: id });
      } catch (error) {
        await this.fail(id, `The validation could not be queued: ${(error as Error).message}`);
        throw error;
      }
      return { id, status: 'queued' };
    } finally {
      await removeQuietly(file.path);
    }
  }

  private duplicate(earlier: { id: string; kind: string; created_at: Date; status: string }) {
    return new ConflictException(
      `This file was imported already: import ${earlier.id} (${earlier.kind}, uploaded ${new Date(earlier.created_at).toISOString()}, ${earlier.status}). Roll that import back first to import the same file again.`,
    );
  }

  private async liveImportOf(sha256: string) {
    const rows: { id: string; kind: string; created_at: Date; status: string }[] =
      await this.dataSource.query(
        `SELECT id, kind, created_at, status FROM imports
         WHERE file_sha256 = $1 AND status NOT IN ('failed', 'rolled_back') LIMIT 1`,
        [sha256],
      );
    return rows[0] ?? null;
  }

  parseMapping(kind: ImportKind, json: string | undefined): ImportMapping | null {
    if (json === undefined || json.trim() === '') return null;
    let value: unknown;
    try {
      value = JSON.parse(json);
    } catch {
      throw new BadRequestException(
        'mapping is not valid JSON: send an object of header to field.',
      );
    }
    return this.checkMapping(kind, value);
  }

  private checkMapping(kind: ImportKind, value: unknown): ImportMapping {
    if (typeof value !== 'object' || value === null || Array.isArray(value)) {
      throw new BadRequestException('mapping must be an object of file header to field.');
    }
    const fields = IMPORT_FIELDS[kind].map((f) => f.name);
    const mapping: ImportMapping = {};
    for (const [header, field] of Object.entries(value as Record<string, unknown>)) {
      if (field === null || field === '') continue;
      if (typeof field !== 'string' || !fields.includes(field)) {
        throw new BadRequestException(
          `mapping: '${String(field)}' (for column '${header}') is not a field of ${kind}; the fields are ${fields.join(', ')}.`,
        );
      }
      mapping[header] = field;
    }
    return mapping;
  }

  async preview(file: UploadedFile | undefined): Promise<ImportPreview> {
    if (!file) throw new BadRequestException('Send the CSV file in the multipart field `file`.');
    try {
      const delimiter = detectDelimiter(await readHeaderLine(file.path));
      const parser = csvParser(delimiter, { toLine: 21 });
      const { createReadStream } = await import('node:fs');
      const source = createReadStream(file.path, { end: 1 << 20 });
      source.pipe(parser);
      const records: string[][] = [];
      try {
        for await (const item of parser as AsyncIterable<{ record: string[] }>) {
          records.push(item.record);
          if (records.length >= 21) break;
        }
      } catch {
        // A first megabyte cut inside a quoted field: show what was read.
      } finally {
        source.destroy();
      }
      const headers = (records.shift() ?? []).map((h) => h.trim());
      const suggestedMappings = {} as ImportPreview['suggestedMappings'];
      const missingFields = {} as ImportPreview['missingFields'];
      for (const kind of IMPORT_KINDS) {
        const mapping: ImportMapping = {};
        for (const header of headers) {
          const key = headerKey(header);
          const field = IMPORT_FIELDS[kind].find((f) => f.name === key || SYNONYMS[key] === f.name);
          if (field && !Object.values(mapping).includes(field.name)) mapping[header] = field.name;
        }
        suggestedMappings[kind] = mapping;
        const resolved = resolveColumns(kind, headers, mapping);
        missingFields[kind] = IMPORT_FIELDS[kind]
          .filter((f) => f.required && !resolved.index.has(f.name))
          .map((f) => f.name);
      }
      return { delimiter, headers, rows: records, suggestedMappings, missingFields };
    } finally {
      await removeQuietly(file.path);
    }
  }

  // ---- reading ------------------------------------------------------------

  async list(): Promise<ImportSummary[]> {
    const rows: ImportRow[] = await this.dataSource.query(
      `${IMPORT_SELECT} ORDER BY i.created_at DESC LIMIT 500`,
    );
    return rows.map(toSummary);
  }

  async get(id: string): Promise<ImportSummary> {
    return toSummary(await this.row(id));
  }

  private async row(id: string, db: Pick<ClientBase, 'query'> | null = null): Promise<ImportRow> {
    const sql = `${IMPORT_SELECT} WHERE i.id = $1`;
    const rows: ImportRow[] = db
      ? (await db.query(sql, [id])).rows
      : await this.dataSource.query(sql, [id]);
    if (!rows[0]) throw new NotFoundException(`There is no import ${id}.`);
    return rows[0];
  }

  async rejections(id: string): Promise<ImportRejection[]> {
    await this.row(id);
    const rows: { line: number; column_name: string; value: string; reason: string }[] =
      await this.dataSource.query(
        `SELECT line, column_name, value, reason FROM import_rejections
         WHERE import_id = $1 ORDER BY line, column_name`,
        [id],
      );
    return rows.map((r) => ({
      line: r.line,
      column: r.column_name,
      value: r.value,
      reason: r.reason,
    }));
  }

  /** The report as CSV; cells that a spreadsheet would run as formulas are neutralised. */
  async rejectionsCsv(id: string): Promise<string> {
    const rows = await this.rejections(id);
    const lines = ['line,column,value,reason'];
    for (const r of rows) {
      lines.push([String(r.line), r.column, r.value, r.reason].map(reportCell).join(','));
    }
    return lines.join('\r\n') + '\r\n';
  }

  // ---- validation ---------------------------------------------------------

  /** The validation job: reads the upload once, then deletes it (it holds raw student numbers). */
  async runValidation(job: ImportJob): Promise<void> {
    const id = job.importId;
    const claimed: { kind: ImportKind }[] = await this.returning(
      `UPDATE imports SET status = 'validating', progress_phase = 'validating', progress_done = 0,
         progress_total = NULL
       WHERE id = $1 AND status = 'queued' AND validated_at IS NULL RETURNING kind`,
      [id],
    );
    if (!claimed[0]) return;
    const started = Date.now();
    try {
      const row = await this.row(id);
      const outcome = await this.validate(id, row.kind, row.mapping, null);
      const ms = Date.now() - started;
      if (outcome.fatal) {
        await this.dataSource.query(
          `UPDATE imports SET status = 'failed', progress_phase = NULL, validation_ms = $2,
             validated_at = now(), message = $3 WHERE id = $1`,
          [id, ms, `The file cannot be read as ${row.kind}: ${outcome.fatal}.`],
        );
        return;
      }
      const commitNow =
        row.commit_requested && outcome.rowsRejected === 0 && outcome.rowsAccepted > 0;
      const message = !row.commit_requested
        ? null
        : outcome.rowsRejected > 0
          ? `${outcome.rowsRejected} row${outcome.rowsRejected === 1 ? ' was' : 's were'} rejected, so the file was not committed. Fix the file, or commit the accepted rows explicitly.`
          : outcome.rowsAccepted === 0
            ? 'The file has no rows to commit.'
            : null;
      await this.dataSource.query(
        `UPDATE imports SET status = $2, progress_phase = NULL, validation_ms = $3,
           validated_at = now(), message = $4 WHERE id = $1`,
        [id, commitNow ? 'queued' : 'validated', ms, message],
      );
      if (commitNow) await this.runCommit({ importId: id });
    } catch (error) {
      this.logger.error(`Validation of import ${id} failed: ${(error as Error).message}`);
      await this.fail(id, `Validation failed: ${(error as Error).message}`);
      await removeQuietly(acceptedPath(this.config.dataDir, id));
    } finally {
      await removeQuietly(uploadPath(this.config.dataDir, id));
    }
  }

  /** Validates the upload of `id`; stores counts and rejections through `db` (or the pool). */
  private async validate(
    id: string,
    kind: ImportKind,
    mapping: ImportMapping | null,
    db: ClientBase | null,
  ) {
    const query = async (sql: string, params?: unknown[]) =>
      db ? (await db.query(sql, params)).rows : await this.dataSource.query(sql, params);
    const scale = await loadGradeScale((sql) => query(sql));
    const courses: { course_code: string }[] = await query(`SELECT course_code FROM courses`);
    const result = await validateFile({
      path: uploadPath(this.config.dataDir, id),
      kind,
      mapping,
      acceptedPath: acceptedPath(this.config.dataDir, id),
      context: {
        knownCourses: new Set(courses.map((c) => c.course_code)),
        scale,
        pseudonymFor: (studentId) => this.pseudonyms.pseudonymFor(studentId),
      },
      onProgress: async (done) => {
        await query(`UPDATE imports SET progress_done = $2 WHERE id = $1`, [id, done]);
      },
    });
    for (let start = 0; start < result.rejections.length; start += 5000) {
      const chunk = result.rejections.slice(start, start + 5000);
      await query(
        `INSERT INTO import_rejections (import_id, line, column_name, value, reason)
         SELECT $1, * FROM unnest($2::int[], $3::text[], $4::text[], $5::text[])`,
        [
          id,
          chunk.map((r) => r.line),
          chunk.map((r) => r.column),
          chunk.map((r) => r.value),
          chunk.map((r) => r.reason),
        ],
      );
    }
    await query(
      `UPDATE imports SET rows_total = $2, rows_accepted = $3, rows_rejected = $4,
         rejections_truncated = $5, delimiter = $6, progress_done = $2, progress_total = $2
       WHERE id = $1`,
      [
        id,
        result.rowsTotal,
        result.rowsAccepted,
        result.rowsRejected,
        result.rejectionsTruncated,
        result.delimiter,
      ],
    );
    return result;
  }

  // ---- commit -------------------------------------------------------------

  /** `POST /api/imports/:id/commit`: the accepted rows, also when some were rejected. */
  async requestCommit(id: string, actor: Actor): Promise<ImportSummary> {
    const row = await this.row(id);
    if (row.status !== 'validated') {
      throw new ConflictException(
        `Import ${id} is ${row.status.replace('_', ' ')}; only a validated import can be committed.`,
      );
    }
    if (!row.rows_accepted) {
      throw new ConflictException(`Import ${id} has no accepted rows to commit.`);
    }
    const claimed: unknown[] = await this.returning(
      `UPDATE imports SET status = 'queued', commit_requested = true, message = NULL
       WHERE id = $1 AND status = 'validated' RETURNING id`,
      [id],
    );
    if (!claimed.length) throw new ConflictException(`Import ${id} is being committed already.`);
    await this.jobs.send(COMMIT_QUEUE, { importId: id, actorId: actor.id });
    return this.get(id);
  }

  /** The commit job: one transaction; on any failure nothing of the import is written. */
  async runCommit(job: ImportJob): Promise<void> {
    const id = job.importId;
    const claimed: { kind: ImportKind; rows_accepted: number; created_by: string | null }[] =
      await this.returning(
        `UPDATE imports SET status = 'committing', progress_phase = 'committing',
           progress_done = 0, progress_total = rows_accepted
         WHERE id = $1 AND status = 'queued' AND validated_at IS NOT NULL
         RETURNING kind, rows_accepted, created_by`,
        [id],
      );
    if (!claimed[0]) return;
    const actorId = job.actorId ?? claimed[0].created_by;
    const runner = this.dataSource.createQueryRunner();
    const started = Date.now();
    let lastProgress = 0;
    try {
      await runner.connect();
      await runner.startTransaction();
      await this.commitInTransaction(runner, id, claimed[0].kind, actorId, started, (rows) => {
        if (rows - lastProgress < 50_000 && rows < claimed[0].rows_accepted) return;
        lastProgress = rows;
        // Through the pool, outside the transaction, so readers see the progress.
        this.dataSource
          .query(`UPDATE imports SET progress_done = $2 WHERE id = $1`, [id, rows])
          .catch(() => undefined);
      });
      await runner.commitTransaction();
      this.logger.log(`Import ${id} committed in ${Date.now() - started} ms.`);
      await removeQuietly(acceptedPath(this.config.dataDir, id));
      this.events.publish({
        importId: id,
        kind: claimed[0].kind,
        action: 'commit',
        at: new Date(),
      });
    } catch (error) {
      if (runner.isTransactionActive) await runner.rollbackTransaction().catch(() => undefined);
      const reason = this.describeWriteError(error);
      this.logger.error(`Commit of import ${id} failed: ${reason}`);
      await this.fail(id, `The commit failed and nothing was written: ${reason}`);
    } finally {
      await runner.release();
    }
  }

  private async commitInTransaction(
    runner: QueryRunner,
    id: string,
    kind: ImportKind,
    actorId: string | null,
    started: number,
    onCopied?: (rows: number) => void,
  ) {
    const client = (await runner.connect()) as ClientBase;
    await client.query(TERM_DATA_LOCK);
    const counts = await commitRows(
      client,
      id,
      kind,
      acceptedPath(this.config.dataDir, id),
      onCopied,
    );
    await client.query(
      `UPDATE imports SET status = 'committed', committed_at = now(), committed_by = $2,
         commit_ms = $3, partial = coalesce(rows_rejected, 0) > 0, progress_phase = NULL,
         progress_done = rows_accepted, message = NULL
       WHERE id = $1`,
      [id, actorId, Date.now() - started],
    );
    const actor = actorId ? await this.actor(client, actorId) : null;
    await this.audit.record(
      {
        actor,
        action: IMPORT_AUDIT.committed as unknown as AuditAction,
        target: id,
        detail: { kind, ...counts },
      },
      runner.manager,
    );
    return counts;
  }

  private async actor(client: ClientBase, id: string): Promise<Actor | null> {
    const { rows } = await client.query<Actor>(`SELECT id, email FROM users WHERE id = $1`, [id]);
    return rows[0] ?? null;
  }

  // ---- rollback -----------------------------------------------------------

  async rollback(id: string, actor: Actor): Promise<ImportSummary> {
    const runner = this.dataSource.createQueryRunner();
    let kind: ImportKind;
    try {
      const client = (await runner.connect()) as ClientBase;
      await runner.startTransaction();
      await client.query(TERM_DATA_LOCK);
      const { rows } = await client.query<{ status: string; kind: ImportKind }>(
        `SELECT status, kind FROM imports WHERE id = $1 FOR UPDATE`,
        [id],
      );
      if (!rows[0]) throw new NotFoundException(`There is no import ${id}.`);
      kind = rows[0].kind;
      if (rows[0].status !== 'committed') {
        throw new ConflictException(
          `Import ${id} is ${rows[0].status.replace('_', ' ')}; only a committed import can be rolled back.`,
        );
      }
      const blockers = await rollbackBlockers(client, id);
      if (blockers.length) {
        const names = blockers
          .map((b) => `${b.importId} (${b.kind}, ${b.createdAt.toISOString()})`)
          .join(', ');
        throw new ConflictException(
          `Import ${id} cannot be rolled back: a later import replaced rows it wrote (${names}). Roll back the later import${blockers.length > 1 ? 's' : ''} first.`,
        );
      }
      const counts = await rollbackRows(client, id, kind);
      if (kind === 'records') await rederiveGradePoints(client);
      await client.query(
        `UPDATE imports SET status = 'rolled_back', rolled_back_at = now(), rolled_back_by = $2
         WHERE id = $1`,
        [id, actor.id],
      );
      await this.audit.record(
        {
          actor,
          action: IMPORT_AUDIT.rolledBack as unknown as AuditAction,
          target: id,
          detail: { kind, ...counts },
        },
        runner.manager,
      );
      await runner.commitTransaction();
    } catch (error) {
      if (runner.isTransactionActive) await runner.rollbackTransaction().catch(() => undefined);
      if ((error as { code?: string }).code === '23503') {
        throw new ConflictException(
          `Import ${id} cannot be rolled back: rows added by later imports still refer to rows it added (${this.describeWriteError(error)}). Roll back those imports first.`,
        );
      }
      throw error;
    } finally {
      await runner.release();
    }
    this.events.publish({ importId: id, kind, action: 'rollback', at: new Date() });
    return this.get(id);
  }

  // ---- the model hook -----------------------------------------------------

  /** Called by the model once it has been rebuilt from the term data this import changed. */
  async markModelRefreshed(importId: string, at: Date = new Date()): Promise<void> {
    await this.dataSource.query(
      `UPDATE imports SET model_refreshed_at = greatest(coalesce(model_refreshed_at, $2), $2)
       WHERE id = $1`,
      [importId, at],
    );
  }

  // ---- saved mappings -----------------------------------------------------

  async mappings(): Promise<SavedImportMapping[]> {
    const rows: {
      id: string;
      name: string;
      kind: ImportKind;
      mapping: ImportMapping;
      created_at: Date;
      email: string | null;
    }[] = await this.dataSource.query(
      `SELECT m.*, u.email FROM import_mappings m LEFT JOIN users u ON u.id = m.created_by
       ORDER BY m.kind, m.name`,
    );
    return rows.map((r) => ({
      id: r.id,
      name: r.name,
      kind: r.kind,
      mapping: r.mapping,
      createdAt: new Date(r.created_at).toISOString(),
      createdBy: r.email,
    }));
  }

  /** Saves a mapping under a name; the same name and kind again replaces it. */
  async saveMapping(
    name: string,
    kind: ImportKind,
    mapping: unknown,
    actor: Actor,
  ): Promise<SavedImportMapping> {
    const checked = this.checkMapping(kind, mapping);
    const rows: { id: string }[] = await this.dataSource.query(
      `INSERT INTO import_mappings (name, kind, mapping, created_by) VALUES ($1, $2, $3, $4)
       ON CONFLICT (kind, name) DO UPDATE SET mapping = EXCLUDED.mapping,
         created_by = EXCLUDED.created_by, created_at = now()
       RETURNING id`,
      [name.trim(), kind, JSON.stringify(checked), actor.id],
    );
    return (await this.mappings()).find((m) => m.id === rows[0].id) as SavedImportMapping;
  }

  // ---- the demo -----------------------------------------------------------

  /**
   * Imports one file inside the caller's transaction, the same validation and
   * commit as an upload (used to load the demo at first start). Throws when a row
   * is rejected: demo files must be clean.
   */
  async importInTransaction(
    manager: EntityManager,
    path: string,
    kind: ImportKind,
    actor: Actor | null,
  ): Promise<{ id: string; rows: number }> {
    const runner = manager.queryRunner;
    if (!runner) throw new Error('importInTransaction needs a transaction.');
    const client = (await runner.connect()) as ClientBase;
    const { copyFile } = await import('node:fs/promises');
    const sha256 = await sha256OfFile(path);
    const { size } = await (await import('node:fs/promises')).stat(path);
    const { rows } = await client.query<{ id: string }>(
      `INSERT INTO imports (kind, status, file_name, file_sha256, file_bytes, commit_requested,
         created_by)
       VALUES ($1, 'validating', $2, $3, $4, true, $5) RETURNING id`,
      [kind, path.split('/').pop(), sha256, size, actor?.id ?? null],
    );
    const id = rows[0].id;
    await copyFile(path, uploadPath(this.config.dataDir, id));
    const started = Date.now();
    try {
      const result = await this.validate(id, kind, null, client);
      await removeQuietly(uploadPath(this.config.dataDir, id));
      if (result.fatal || result.rowsRejected > 0) {
        const first = result.rejections[0];
        throw new Error(
          `${path}: ${result.fatal ?? `${result.rowsRejected} rows rejected, first line ${first.line}, ${first.column}: ${first.reason}`}`,
        );
      }
      await client.query(
        `UPDATE imports SET status = 'committing', validated_at = now(), validation_ms = $2
         WHERE id = $1`,
        [id, Date.now() - started],
      );
      await this.record(actor, IMPORT_AUDIT.uploaded, id, { kind, sha256, demo: true }, manager);
      const commitStarted = Date.now();
      await this.commitInTransaction(runner, id, kind, actor?.id ?? null, commitStarted);
      return { id, rows: result.rowsAccepted };
    } finally {
      await removeQuietly(uploadPath(this.config.dataDir, id));
      await removeQuietly(acceptedPath(this.config.dataDir, id));
    }
  }

  /** Tells subscribers (the model) that the demo's term data is in place. */
  publishLoaded(importId: string, kind: ImportKind): void {
    this.events.publish({ importId, kind, action: 'commit', at: new Date() });
  }

  // ---- helpers --------------------------------------------------------------

  /** Rows of an UPDATE … RETURNING (TypeORM answers those as [rows, count]). */
  private async returning<T>(sql: string, params?: unknown[]): Promise<T[]> {
    const result: unknown = await this.dataSource.query(sql, params);
    if (Array.isArray(result) && result.length === 2 && Array.isArray(result[0])) {
      return result[0] as T[];
    }
    return result as T[];
  }

  private async fail(id: string, message: string): Promise<void> {
    await this.dataSource
      .query(
        `UPDATE imports SET status = 'failed', progress_phase = NULL, message = $2 WHERE id = $1`,
        [id, message.slice(0, 2000)],
      )
      .catch(() => undefined);
  }

  private async record(
    actor: Actor | null,
    action: string,
    target: string,
    detail: Record<string, unknown>,
    manager?: EntityManager,
  ): Promise<void> {
    await this.audit.record(
      { actor, action: action as unknown as AuditAction, target, detail },
      manager,
    );
  }

  /** A database error in a sentence; PostgreSQL's details name pseudonyms and codes, never raw ids. */
  private describeWriteError(error: unknown): string {
    const e = error as { code?: string; message?: string; detail?: string };
    if (e.code === '23503') {
      return `a row refers to a course or student that is not there (${e.detail ?? e.message})`;
    }
    return e.message ?? String(error);
  }
}

/** Common header spellings of registrar exports, suggested on the mapping screen. */
const SYNONYMS: Record<string, string> = {
  course: 'course_code',
  code: 'course_code',
  course_id: 'course_code',
  course_number: 'course_code',
  dept: 'department',
  course_title: 'title',
  name: 'title',
  prereqs: 'prerequisites',
  prerequisite: 'prerequisites',
  semester: 'term',
  session: 'term',
  seats: 'capacity',
  student: 'student_id',
  student_no: 'student_id',
  student_number: 'student_id',
  student_num: 'student_id',
  id: 'student_id',
  programme: 'program',
  program_of_study: 'program',
  entry: 'entry_term',
  start_term: 'entry_term',
  final_grade: 'grade',
  mark: 'grade',
  evaluation: 'satisfaction',
  attempted_credits: 'credits_attempted',
};
