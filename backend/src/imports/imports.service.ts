import {
  BadRequestException,
  ConflictException,
  Injectable,
  Logger,
  NotFoundException,
  OnApplicationBootstrap,
  UnprocessableEntityException,
} from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import { createReadStream, existsSync } from 'node:fs';
import { chmod, readdir, rename } from 'node:fs/promises';
import { join } from 'node:path';
import type {
  ImportAccepted,
  ImportEncoding,
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
import { acceptedPath, removeQuietly, uploadPath, uploadsDir } from './import-files';
import { decodeToUtf8, ENCODING_NAMES, inspectFile, type FileInspection } from './file-inspection';
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
import { validateFile, resolveColumns, headerLooksLikeData } from './validation/validate-file';
import { looksLikeStudentNumber, withholdStudentNumbers } from './validation/withhold';

/** Audit actions of the import feature; detail never holds a student number. */
export const IMPORT_AUDIT = {
  uploaded: 'import.uploaded',
  committed: 'import.committed',
  rolledBack: 'import.rolled_back',
  discarded: 'import.discarded',
  checkedAgain: 'import.checked_again',
} as const;

type Actor = Pick<User, 'id' | 'email'>;

interface EarlierImport {
  id: string;
  kind: string;
  file_name: string;
  created_at: Date;
  committed_at?: Date | null;
}

/** An import in words, by file name and date (ISO), for messages people read. */
export function describeImport(i: EarlierImport): string {
  const at = new Date(i.committed_at ?? i.created_at).toISOString().slice(0, 16).replace('T', ' ');
  return `the ${i.kind} import of '${i.file_name}' ${i.committed_at ? 'committed' : 'uploaded'} ${at} UTC`;
}

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
    await this.protectStoredFileFacts();
    await this.jobs.start({
      validate: (job) => this.runValidation(job),
      commit: (job) => this.runCommit(job),
    });
  }

  /**
   * A server stopped mid-validation or mid-commit: the commit's transaction never
   * completed, so the live tables are as before; say so in the history. Working
   * files of imports that are no longer open, and any half-received upload, go.
   */
  async recoverInterrupted(): Promise<void> {
    const rows: { id: string; status: string }[] = await this.returning(
      `UPDATE imports SET status = 'failed', progress_phase = NULL,
         message = CASE status
           WHEN 'committing' THEN 'The server stopped during the commit; nothing of this import was written. Commit it again by uploading the file again.'
           ELSE 'The server stopped during validation; upload the file again.' END
       WHERE status IN ('validating', 'committing') RETURNING id, status`,
    );
    for (const row of rows) {
      this.logger.warn(`Import ${row.id} was interrupted by a restart and is marked failed.`);
    }
    await this.removeLeftovers();
  }

  /** Every file in uploads/ that belongs to no open import (validated or queued) is removed. */
  async removeLeftovers(): Promise<void> {
    const dir = uploadsDir(this.config.dataDir);
    const open: { id: string }[] = await this.dataSource.query(
      `SELECT id FROM imports WHERE status IN ('queued', 'validated')`,
    );
    const keep = new Set(open.map((r) => r.id));
    for (const name of await readdir(dir)) {
      const id = /^([0-9a-f-]{36})\.(upload|accepted)\.csv$/.exec(name)?.[1];
      if (id === undefined || !keep.has(id)) await removeQuietly(join(dir, name));
    }
  }

  /**
   * Rows written before digests were keyed get the keyed digest of their SHA-256,
   * and stored file names lose anything shaped like a student number.
   */
  async protectStoredFileFacts(): Promise<void> {
    const plain: { id: string; file_digest: string }[] = await this.dataSource.query(
      `SELECT id, file_digest FROM imports WHERE NOT digest_keyed`,
    );
    for (const row of plain) {
      await this.dataSource.query(
        `UPDATE imports SET file_digest = $2, digest_keyed = true WHERE id = $1`,
        [row.id, this.pseudonyms.fileDigest(row.file_digest)],
      );
    }
    const names: { id: string; file_name: string }[] = await this.dataSource.query(
      `SELECT id, file_name FROM imports WHERE file_name ~ '[0-9]{4}'`,
    );
    for (const row of names) {
      const safe = this.safeFileName(row.file_name);
      if (safe === row.file_name) continue;
      await this.dataSource.query(`UPDATE imports SET file_name = $2 WHERE id = $1`, [
        row.id,
        safe,
      ]);
      await this.dataSource.query(
        `UPDATE audit_events SET detail = jsonb_set(detail, '{fileName}', to_jsonb($2::text))
         WHERE target = $1 AND action = 'import.uploaded' AND detail ? 'fileName'`,
        [row.id, safe],
      );
    }
  }

  /** A file name as kept: anything matching the student-number pattern is withheld. */
  safeFileName(name: string): string {
    return withholdStudentNumbers(name, this.config.studentNumberPattern).slice(0, 255);
  }

  // ---- upload and preview -------------------------------------------------

  /**
   * Refuses what cannot be a CSV file of term data before anything is stored: an
   * empty or binary file, or one in another encoding that was not confirmed.
   */
  private async inspect(
    file: UploadedFile,
    confirmed: string | undefined,
  ): Promise<FileInspection & { readAs: ImportEncoding }> {
    const found = await inspectFile(file.path);
    if (found.bytes === 0 || found.empty) {
      throw new BadRequestException(
        'The file is empty: it has no header row and no rows. Export the file again from the student information system.',
      );
    }
    if (found.binary) {
      throw new BadRequestException(
        `This is not a CSV file: it looks like ${found.binary}. Choose a CSV file (comma or semicolon separated text).`,
      );
    }
    if (found.encoding === 'utf-8') return { ...found, readAs: 'utf-8' };
    if (confirmed === undefined || confirmed === '' || confirmed === 'utf-8') {
      throw new UnprocessableEntityException({
        statusCode: 422,
        message: `The file is not UTF-8; it looks like ${ENCODING_NAMES[found.encoding]}. Confirm the encoding to read it in, or save the file as UTF-8.`,
        details: { detectedEncoding: found.encoding, encodingName: ENCODING_NAMES[found.encoding] },
      });
    }
    return { ...found, readAs: confirmed as ImportEncoding };
  }

  /** Puts the upload where validation reads it, as UTF-8, readable by the server only. */
  private async placeUpload(file: UploadedFile, target: string, encoding: ImportEncoding) {
    if (encoding === 'utf-8') {
      await rename(file.path, target);
      await chmod(target, 0o600);
      return;
    }
    const { undefinedAtLine } = await decodeToUtf8(file.path, target, encoding);
    if (undefinedAtLine !== null) {
      await removeQuietly(target);
      throw new BadRequestException(
        `Line ${undefinedAtLine} holds a byte that ${ENCODING_NAMES[encoding]} does not define, so the file is not in that encoding. Save the file as UTF-8, or confirm another encoding.`,
      );
    }
  }

  async upload(
    file: UploadedFile | undefined,
    kind: ImportKind,
    mappingJson: string | undefined,
    commit: boolean,
    actor: Actor,
    encoding?: string,
  ): Promise<ImportAccepted> {
    if (!file) throw new BadRequestException('Send the CSV file in the multipart field `file`.');
    try {
      const mapping = this.parseMapping(kind, mappingJson);
      const found = await this.inspect(file, encoding);
      const digest = this.pseudonyms.fileDigest(found.sha256);
      const earlier = await this.committedImportOf(digest);
      if (earlier) throw this.duplicate(earlier);
      const fileName = this.safeFileName(file.originalname);
      const rows: { id: string }[] = await this.dataSource.query(
        `INSERT INTO imports (kind, status, file_name, file_digest, digest_keyed, file_bytes,
           mapping, commit_requested, created_by)
         VALUES ($1, 'queued', $2, $3, true, $4, $5, $6, $7) RETURNING id`,
        [
          kind,
          fileName,
          digest,
          file.size,
          mapping ? JSON.stringify(mapping) : null,
          commit,
          actor.id,
        ],
      );
      const id = rows[0].id;
      try {
        await this.placeUpload(file, uploadPath(this.config.dataDir, id), found.readAs);
      } catch (error) {
        await this.fail(id, (error as Error).message);
        throw error;
      }
      await this.record(actor, IMPORT_AUDIT.uploaded, id, {
        kind,
        fileName,
        bytes: file.size,
        encoding: found.readAs,
        commitRequested: commit,
      });
      await this.queueValidation(id);
      return { id, status: 'queued' };
    } finally {
      await removeQuietly(file.path);
    }
  }

  private async queueValidation(id: string): Promise<void> {
    try {
      await this.jobs.send(VALIDATE_QUEUE, { importId: id });
    } catch (error) {
      await this.fail(id, `The validation could not be queued: ${(error as Error).message}`);
      throw error;
    }
  }

  private duplicate(earlier: EarlierImport) {
    return new ConflictException({
      message: `This file was committed already: ${describeImport(earlier)}. Roll that import back first to import the same file again.`,
      details: { earlierImportId: earlier.id },
    });
  }

  /** The committed import of the same file, if any: only a committed file blocks it again. */
  private async committedImportOf(digest: string, except?: string): Promise<EarlierImport | null> {
    const rows: EarlierImport[] = await this.dataSource.query(
      `SELECT id, kind, file_name, created_at, committed_at FROM imports
       WHERE file_digest = $1 AND status IN ('committing', 'committed') AND id <> $2::uuid
       LIMIT 1`,
      [digest, except ?? '00000000-0000-0000-0000-000000000000'],
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
      // A mapping is stored: a "header" that is a student number means a file without one.
      if (looksLikeStudentNumber(header, this.config.studentNumberPattern)) {
        throw new BadRequestException(
          'The mapping names a column that looks like a student number: the first line of the file holds data, not column names. Add a header row naming the columns.',
        );
      }
      if (typeof field !== 'string' || !fields.includes(field)) {
        throw new BadRequestException(
          `mapping: '${String(field)}' (for column '${header}') is not a field of ${kind}; the fields are ${fields.join(', ')}.`,
        );
      }
      mapping[header] = field;
    }
    return mapping;
  }

  async preview(file: UploadedFile | undefined, encoding?: string): Promise<ImportPreview> {
    if (!file) throw new BadRequestException('Send the CSV file in the multipart field `file`.');
    const decoded = `${file.path}.utf8`;
    try {
      const found = await this.inspect(file, encoding);
      let path = file.path;
      if (found.readAs !== 'utf-8') {
        await this.placeUpload({ ...file, path: file.path }, decoded, found.readAs);
        path = decoded;
      }
      return { ...(await this.previewOf(path)), encoding: found.readAs };
    } finally {
      await removeQuietly(file.path);
      await removeQuietly(decoded);
    }
  }

  /** Headers, first rows and suggestions of a UTF-8 file on disk. */
  private async previewOf(path: string): Promise<Omit<ImportPreview, 'encoding'>> {
    const delimiter = detectDelimiter(await readHeaderLine(path));
    const parser = csvParser(delimiter, { toLine: 21 });
    const source = createReadStream(path, { end: 1 << 20 });
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
      suggestedMappings[kind] = suggestMapping(kind, headers);
      const resolved = resolveColumns(kind, headers, suggestedMappings[kind]);
      missingFields[kind] = IMPORT_FIELDS[kind]
        .filter((f) => f.required && !resolved.index.has(f.name))
        .map((f) => f.name);
    }
    return {
      delimiter,
      headers,
      rows: records,
      suggestedMappings,
      missingFields,
      likelyKind: likelyKind(headers),
    };
  }

  /** The preview of a validated import's kept upload, to choose another mapping. */
  async keptPreview(id: string): Promise<ImportPreview> {
    const { path } = await this.keptUpload(
      id,
      'The file of this import is no longer kept: it is kept only while the import is validated and not yet committed or discarded. Upload the file again.',
    );
    return { ...(await this.previewOf(path)), encoding: 'utf-8' };
  }

  /** The import and its kept upload, or 409 with `gone` when the file is no longer kept. */
  private async keptUpload(id: string, gone: string): Promise<{ row: ImportRow; path: string }> {
    const row = await this.row(id);
    const path = uploadPath(this.config.dataDir, id);
    if (row.status !== 'validated' || !existsSync(path)) throw new ConflictException(gone);
    return { row, path };
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

  /**
   * The validation job. The upload (it holds raw student numbers) stays on disk
   * only while the import is open, for the rejected rows and a check with another
   * mapping; it goes when the import is committed, discarded or fails.
   */
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
    let open = false;
    try {
      const row = await this.row(id);
      const outcome = await this.validate(id, row.kind, row.mapping, null);
      const ms = Date.now() - started;
      const fatal =
        outcome.fatal === null
          ? outcome.rowsTotal === 0
            ? 'The file has a header row but no rows under it: there is nothing to import.'
            : null
          : `The file cannot be read as ${row.kind}: ${outcome.fatal}.${this.kindHint(row.kind, outcome.headers)}`;
      if (fatal) {
        // Files first, so that whoever sees the import failed finds nothing left on disk.
        await this.removeWorkingFiles(id);
        await this.dataSource.query(
          `UPDATE imports SET status = 'failed', progress_phase = NULL, validation_ms = $2,
             validated_at = now(), message = $3 WHERE id = $1`,
          [id, ms, fatal],
        );
        return;
      }
      const commitNow =
        row.commit_requested && outcome.rowsRejected === 0 && outcome.rowsAccepted > 0;
      const message = !row.commit_requested
        ? null
        : outcome.rowsRejected > 0
          ? `${outcome.rowsRejected} row${outcome.rowsRejected === 1 ? ' was' : 's were'} rejected, so the file was not committed. Fix the file, or commit the accepted rows explicitly.`
          : null;
      await this.dataSource.query(
        `UPDATE imports SET status = $2, progress_phase = NULL, validation_ms = $3,
           validated_at = now(), message = $4 WHERE id = $1`,
        [id, commitNow ? 'queued' : 'validated', ms, message],
      );
      open = !commitNow;
      if (commitNow) await this.runCommit({ importId: id });
    } catch (error) {
      const reason = withholdStudentNumbers(
        (error as Error).message,
        this.config.studentNumberPattern,
      );
      this.logger.error(`Validation of import ${id} failed: ${reason}`);
      await this.removeWorkingFiles(id);
      await this.fail(id, `Validation failed: ${reason}`);
    } finally {
      if (!open) await this.removeWorkingFiles(id);
    }
  }

  /** A file whose headers fit another kind says so: the kind chosen is the likely mistake. */
  private kindHint(kind: ImportKind, headers: string[]): string {
    if (headerLooksLikeData(headers, this.config.studentNumberPattern)) return '';
    const likely = likelyKind(headers);
    return likely && likely !== kind
      ? ` Its columns look like a ${likely} file: upload it again as ${likely}.`
      : '';
  }

  private async removeWorkingFiles(id: string): Promise<void> {
    await removeQuietly(uploadPath(this.config.dataDir, id));
    await removeQuietly(acceptedPath(this.config.dataDir, id));
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
        studentNumber: this.config.studentNumberPattern,
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
         rejections_truncated = $5, delimiter = $6, progress_done = $2, progress_total = $2,
         left_out = $7
       WHERE id = $1`,
      [
        id,
        result.rowsTotal,
        result.rowsAccepted,
        result.rowsRejected,
        result.rejectionsTruncated,
        result.delimiter,
        result.fatal === null ? JSON.stringify(this.leftOut(kind, result.headers, mapping)) : null,
      ],
    );
    return result;
  }

  /** File columns no field took, and optional fields no column gave (header names withheld as needed). */
  private leftOut(kind: ImportKind, headers: string[], mapping: ImportMapping | null) {
    const resolved = resolveColumns(kind, headers, mapping, this.config.studentNumberPattern);
    const used = new Set(resolved.index.values());
    return {
      columns: headers
        .filter((h, i) => !used.has(i) && h !== '')
        .map((h) => withholdStudentNumbers(h, this.config.studentNumberPattern)),
      fields: IMPORT_FIELDS[kind]
        .filter((f) => !f.required && !resolved.index.has(f.name))
        .map((f) => f.name),
    };
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
    const earlier = await this.committedImportOf(row.file_digest, id);
    if (earlier) throw this.duplicate(earlier);
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
    let claimed: { kind: ImportKind; rows_accepted: number; created_by: string | null }[];
    try {
      claimed = await this.returning(
        `UPDATE imports SET status = 'committing', progress_phase = 'committing',
           progress_done = 0, progress_total = rows_accepted
         WHERE id = $1 AND status = 'queued' AND validated_at IS NOT NULL
         RETURNING kind, rows_accepted, created_by`,
        [id],
      );
    } catch (error) {
      // Two imports of one file committed at once: the second finds the first committed.
      if ((error as { code?: string }).code !== '23505') throw error;
      const row = await this.row(id);
      const earlier = await this.committedImportOf(row.file_digest, id);
      await this.fail(
        id,
        earlier
          ? (this.duplicate(earlier).getResponse() as { message: string }).message
          : 'The same file is being committed already.',
      );
      await this.removeWorkingFiles(id);
      return;
    }
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
      // The rows are in the transaction: the working files go before anyone sees it committed.
      await this.removeWorkingFiles(id);
      await runner.commitTransaction();
      this.logger.log(`Import ${id} committed in ${Date.now() - started} ms.`);
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
      await this.removeWorkingFiles(id);
      await this.fail(id, `The commit failed and nothing was written: ${reason}`);
    } finally {
      await runner.release();
      await this.removeWorkingFiles(id);
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

  // ---- discard and check again --------------------------------------------

  /** A validated import that is not wanted: kept in the history as discarded, its files removed. */
  async discard(id: string, actor: Actor): Promise<ImportSummary> {
    const claimed: unknown[] = await this.returning(
      `UPDATE imports SET status = 'discarded', discarded_at = now(), discarded_by = $2,
         message = NULL
       WHERE id = $1 AND status = 'validated' RETURNING id`,
      [id, actor.id],
    );
    if (!claimed.length) {
      const row = await this.row(id);
      throw new ConflictException(
        `This import is ${row.status.replace('_', ' ')}; only a validated import that is not committed can be discarded.`,
      );
    }
    await this.removeWorkingFiles(id);
    await this.record(actor, IMPORT_AUDIT.discarded, id, {});
    return this.get(id);
  }

  /**
   * Checks the kept upload of a validated import again under another mapping: a
   * new import takes the file, the first is discarded.
   */
  async checkAgain(
    id: string,
    mappingJson: string | undefined,
    actor: Actor,
  ): Promise<ImportAccepted> {
    const row = await this.row(id);
    const mapping = this.parseMapping(row.kind, mappingJson);
    const upload = uploadPath(this.config.dataDir, id);
    if (row.status !== 'validated' || !existsSync(upload)) {
      throw new ConflictException(
        `This import is ${row.status.replace('_', ' ')}; only a validated import that is not committed can be checked again. Upload the file again instead.`,
      );
    }
    const discarded: unknown[] = await this.returning(
      `UPDATE imports SET status = 'discarded', discarded_at = now(), discarded_by = $2,
         message = 'Checked again with another mapping.'
       WHERE id = $1 AND status = 'validated' RETURNING id`,
      [id, actor.id],
    );
    if (!discarded.length) throw new ConflictException('This import is being changed already.');
    const rows: { id: string }[] = await this.dataSource.query(
      `INSERT INTO imports (kind, status, file_name, file_digest, digest_keyed, file_bytes,
         mapping, commit_requested, created_by)
       VALUES ($1, 'queued', $2, $3, true, $4, $5, false, $6) RETURNING id`,
      [
        row.kind,
        row.file_name,
        row.file_digest,
        row.file_bytes,
        mapping ? JSON.stringify(mapping) : null,
        actor.id,
      ],
    );
    const next = rows[0].id;
    await rename(upload, uploadPath(this.config.dataDir, next));
    await this.removeWorkingFiles(id);
    await this.record(actor, IMPORT_AUDIT.checkedAgain, next, { kind: row.kind, previous: id });
    await this.queueValidation(next);
    return { id: next, status: 'queued' };
  }

  /**
   * The rejected rows in the file's own columns plus `reason`, read from the kept
   * upload (never stored): ready to fix and import again.
   */
  async rejectedRowsCsv(id: string): Promise<string> {
    const { row, path } = await this.keptUpload(
      id,
      'The rejected rows can be downloaded only while the import is validated and not yet committed or discarded: the uploaded file is kept until then.',
    );
    const reasons = new Map<number, string[]>();
    for (const r of await this.rejections(id)) {
      const list = reasons.get(r.line) ?? [];
      list.push(r.column ? `${r.column}: ${r.reason}` : r.reason);
      reasons.set(r.line, list);
    }
    const delimiter = (row.delimiter ?? ',') as ',' | ';';
    const parser = csvParser(delimiter);
    const source = createReadStream(path);
    source.pipe(parser);
    const cell = (v: string) =>
      /["\r\n\t]/.test(v) || v.includes(delimiter) || v.trim() !== v
        ? `"${v.replace(/"/g, '""')}"`
        : v;
    const lines: string[] = [];
    let first = true;
    try {
      for await (const item of parser as AsyncIterable<{
        record: string[];
        info: { lines: number };
      }>) {
        if (first) {
          lines.push([...item.record, 'reason'].map(cell).join(delimiter));
          first = false;
          continue;
        }
        const why = reasons.get(item.info.lines);
        if (why) lines.push([...item.record, why.join('; ')].map(cell).join(delimiter));
      }
    } finally {
      source.destroy();
    }
    return '\ufeff' + lines.join('\r\n') + '\r\n';
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
          `This import is ${rows[0].status.replace('_', ' ')}; only a committed import can be rolled back.`,
        );
      }
      const blockers = await rollbackBlockers(client, id);
      if (blockers.length) {
        throw new ConflictException(
          `This import cannot be rolled back yet: a later import replaced rows it wrote. Roll back ${blockers.map(describeImport).join(', then ')} first.`,
        );
      }
      const counts = await rollbackRows(client, id, kind, async (referrers) => {
        throw new ConflictException(
          referrers.length
            ? `This import cannot be rolled back yet: later imports added rows that refer to rows it added. Roll back ${referrers.map(describeImport).join(', then ')} first.`
            : 'This import cannot be rolled back: other term data refers to rows it added.',
        );
      });
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
          'This import cannot be rolled back: other term data refers to rows it added.',
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
    const found = await inspectFile(path);
    const { rows } = await client.query<{ id: string }>(
      `INSERT INTO imports (kind, status, file_name, file_digest, digest_keyed, file_bytes,
         commit_requested, created_by)
       VALUES ($1, 'validating', $2, $3, true, $4, true, $5) RETURNING id`,
      [
        kind,
        this.safeFileName(path.split('/').pop() ?? kind),
        this.pseudonyms.fileDigest(found.sha256),
        found.bytes,
        actor?.id ?? null,
      ],
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
      await this.record(actor, IMPORT_AUDIT.uploaded, id, { kind, demo: true }, manager);
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

/** The kind's fields matched to headers by name or a common spelling; each field once. */
export function suggestMapping(kind: ImportKind, headers: string[]): ImportMapping {
  const mapping: ImportMapping = {};
  for (const header of headers) {
    const key = headerKey(header);
    // "Rating (1-5)" reads as rating: a trailing range or unit does not hide the name.
    const bare = key.replace(/(_\d+)+$/, '');
    const field = IMPORT_FIELDS[kind].find(
      (f) =>
        f.name === key || SYNONYMS[key] === f.name || f.name === bare || SYNONYMS[bare] === f.name,
    );
    if (field && !Object.values(mapping).includes(field.name)) mapping[header] = field.name;
  }
  return mapping;
}

/**
 * The one kind whose required fields the headers all give, choosing the kind
 * with the most matched columns when several do (a records file also gives
 * every column of students).
 */
export function likelyKind(headers: string[]): ImportKind | null {
  let best: { kind: ImportKind; matched: number } | null = null;
  for (const kind of IMPORT_KINDS) {
    const mapping = suggestMapping(kind, headers);
    const given = new Set(Object.values(mapping));
    if (!IMPORT_FIELDS[kind].every((f) => !f.required || given.has(f.name))) continue;
    const required = IMPORT_FIELDS[kind].filter((f) => f.required).length;
    if (!best || required > best.matched) best = { kind, matched: required };
  }
  return best?.kind ?? null;
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
  rating: 'satisfaction',
  course_rating: 'satisfaction',
  attempted_credits: 'credits_attempted',
  credits: 'credits_attempted',
  credit_hours: 'credits_attempted',
};
