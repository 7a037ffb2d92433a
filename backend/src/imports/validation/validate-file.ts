import { createReadStream, createWriteStream } from 'node:fs';
import { once } from 'node:events';
import type { ImportKind, ImportMapping, ImportRejection } from '@kinpath/contracts';
import { IMPORT_FIELDS } from '@kinpath/contracts';
import {
  copyCell,
  csvParser,
  detectDelimiter,
  headerKey,
  fieldIsQuoted,
  readHeaderLine,
} from './csv-format';
import type { Delimiter } from './csv-format';
import { rulesFor, TEXT_LIMITS, WITHHELD_STUDENT_ID, type RuleContext } from './row-rules';
import { looksLikeStudentNumber, withholdStudentNumbers } from './withhold';

export interface ValidateFileOptions {
  path: string;
  kind: ImportKind;
  mapping?: ImportMapping | null;
  context: RuleContext;
  /** Accepted rows, as stored (pseudonyms, normal forms), are written here as CSV for COPY. */
  acceptedPath: string;
  /** Called every `progressEvery` rows with the rows read so far. */
  onProgress?: (done: number) => Promise<void> | void;
  progressEvery?: number;
  /** Rejections kept for the report; the counts always cover every row. */
  maxRejections?: number;
}

export interface ValidationResult {
  delimiter: Delimiter;
  headers: string[];
  rowsTotal: number;
  rowsAccepted: number;
  rowsRejected: number;
  rejections: ImportRejection[];
  rejectionsTruncated: boolean;
  /** Set when the file as a whole cannot be read as this kind (e.g. a required column is missing). */
  fatal: string | null;
}

export interface ResolvedColumns {
  /** Field name to the index of the file's column. */
  index: Map<string, number>;
  /** Field name to the header the file gives it, for reports. */
  header: Map<string, string>;
  problem: string | null;
}

/**
 * Matches the file's headers to the kind's fields: the mapping first (header to
 * field), then headers that are the field names themselves.
 */
export function resolveColumns(
  kind: ImportKind,
  headers: string[],
  mapping?: ImportMapping | null,
  studentNumber?: string,
): ResolvedColumns {
  const fields = IMPORT_FIELDS[kind];
  const names = new Set(fields.map((f) => f.name));
  const index = new Map<string, number>();
  const header = new Map<string, string>();
  const mapped = new Map<string, string>();
  for (const [from, to] of Object.entries(mapping ?? {})) {
    if (to) mapped.set(from.trim(), to);
  }
  const problems: string[] = [];
  headers.forEach((raw, i) => {
    const h = raw.trim();
    const field = mapped.has(h) ? mapped.get(h)! : names.has(headerKey(h)) ? headerKey(h) : null;
    if (field === null || !names.has(field)) return;
    if (index.has(field)) {
      problems.push(
        `columns '${withholdStudentNumbers(header.get(field)!, studentNumber)}' and '${withholdStudentNumbers(h, studentNumber)}' both give ${field}`,
      );
      return;
    }
    index.set(field, i);
    header.set(field, h);
  });
  for (const [from] of mapped) {
    if (!headers.some((h) => h.trim() === from)) {
      problems.push(
        `the mapping names a column '${withholdStudentNumbers(from, studentNumber)}' that the file does not have`,
      );
    }
  }
  const missing = fields.filter((f) => f.required && !index.has(f.name)).map((f) => f.name);
  if (missing.length && headerLooksLikeData(headers, studentNumber)) {
    // The first line is a row of data: naming its cells would quote student numbers.
    problems.push(
      `the first line holds data, not column names: add a header row naming the columns (${fields.map((f) => f.name).join(', ')})`,
    );
  } else if (missing.length) {
    problems.push(
      `the required column${missing.length > 1 ? 's' : ''} ${missing.join(', ')} ${missing.length > 1 ? 'are' : 'is'} missing; map ${missing.length > 1 ? 'them' : 'it'} to columns of the file (${headers.map((h) => `'${withholdStudentNumbers(h, studentNumber)}'`).join(', ')})`,
    );
  }
  for (const field of names) if (!header.has(field)) header.set(field, field);
  return { index, header, problem: problems.length ? problems.join('; ') : null };
}

/** A header row of student numbers, terms, course codes or numbers is a row of data. */
export function headerLooksLikeData(headers: string[], studentNumber?: string): boolean {
  return headers.some(
    (h) =>
      looksLikeStudentNumber(h, studentNumber) ||
      /^\d{4}-(WI|SP|SU|FA)$/i.test(h.trim()) ||
      /^[A-Za-z]{2,6} ?\d{3,5}$/.test(h.trim()) ||
      /^\d+(\.\d+)?$/.test(h.trim()),
  );
}

/**
 * A control character other than tab and line break: a line break can only stand
 * inside quotes (a multi-line description), a tab is refused separately when unquoted.
 */
// eslint-disable-next-line no-control-regex -- control characters are what it finds
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/;

const controlName = (char: string) =>
  char === '\u0000' ? 'NUL' : `U+${char.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`;

/** What a rejection keeps of a cell: never a student number, never more than 200 characters. */
function storedValue(value: string, studentNumber?: string): string {
  const clean = withholdStudentNumbers(value, studentNumber);
  return clean.length > 200 ? `${clean.slice(0, 200)}…` : clean;
}

/**
 * Reads the file once, streaming: every row is checked against the kind's rules,
 * accepted rows go to `acceptedPath` in their stored form, rejections are
 * collected with the file's line and column. Nothing touches the live tables.
 */
export async function validateFile(options: ValidateFileOptions): Promise<ValidationResult> {
  const { kind, context } = options;
  const maxRejections = options.maxRejections ?? 50_000;
  const progressEvery = options.progressEvery ?? 50_000;
  const delimiter = detectDelimiter(await readHeaderLine(options.path));
  const rules = rulesFor(kind, context);

  const result: ValidationResult = {
    delimiter,
    headers: [],
    rowsTotal: 0,
    rowsAccepted: 0,
    rowsRejected: 0,
    rejections: [],
    rejectionsTruncated: false,
    fatal: null,
  };
  const studentNumber = context.studentNumber;
  // Every rejection passes here: a cell that looks like a student number is stored as the mark.
  const addRejection = (rejection: ImportRejection) => {
    if (result.rejections.length >= maxRejections) {
      result.rejectionsTruncated = true;
      return;
    }
    result.rejections.push({
      line: rejection.line,
      column: withholdStudentNumbers(rejection.column, studentNumber),
      value: storedValue(rejection.value, studentNumber),
      reason: withholdStudentNumbers(rejection.reason, studentNumber),
    });
  };

  const out = createWriteStream(options.acceptedPath, { encoding: 'utf8', mode: 0o600 });
  const outClosed = once(out, 'close');
  let buffer = '';
  const flush = async () => {
    if (buffer === '') return;
    const chunk = buffer;
    buffer = '';
    if (!out.write(chunk)) await once(out, 'drain');
  };
  // Rows of a deferred kind wait for `finish` (a prerequisite may name a later row).
  const held: { line: number; row: string }[] = [];
  const rejectedLines = new Set<number>();

  const parser = csvParser(delimiter);
  parser.on('skip', (error: Error & { lines?: number }) => {
    result.rowsTotal++;
    result.rowsRejected++;
    addRejection({
      line: error.lines ?? 0,
      column: '',
      value: '',
      reason: describeCsvError(error),
    });
  });
  const source = createReadStream(options.path);
  source.on('error', (error) => parser.destroy(error));
  source.pipe(parser);

  let columns: ResolvedColumns | null = null;
  let cells: string[] = [];
  const cell = (field: string): string => {
    const i = columns!.index.get(field);
    return i === undefined ? '' : (cells[i] ?? '');
  };
  let line = 0;
  let raw = '';
  let rowOk = true;
  const reject = (field: string, value: string, reason: string) => {
    rowOk = false;
    addRejection({ line, column: columns!.header.get(field) ?? field, value, reason });
  };

  try {
    for await (const item of parser as AsyncIterable<{
      record: string[];
      raw: string;
      info: { lines: number };
    }>) {
      cells = item.record;
      raw = item.raw;
      line = item.info.lines;
      if (columns === null) {
        result.headers = cells.map((h) => h.trim());
        columns = resolveColumns(kind, result.headers, options.mapping, studentNumber);
        if (columns.problem) {
          result.fatal = columns.problem;
          addRejection({ line: 1, column: '', value: '', reason: columns.problem });
          break;
        }
        continue;
      }
      result.rowsTotal++;
      rowOk = true;
      if (cells.length !== result.headers.length) {
        reject(
          '',
          '',
          `the row has ${cells.length} field${cells.length === 1 ? '' : 's'} where the header has ${result.headers.length}`,
        );
      } else if (checkText(columns, cells, (i) => fieldIsQuoted(raw, delimiter, i), reject)) {
        const row = rules.check(cell, line, reject);
        if (row !== null && rowOk) {
          const text = row.map(copyCell).join(',') + '\n';
          if (rules.deferred) held.push({ line, row: text });
          else {
            buffer += text;
            result.rowsAccepted++;
            if (buffer.length > 65_536) await flush();
          }
        }
      }
      if (!rowOk) {
        result.rowsRejected++;
        rejectedLines.add(line);
      }
      if (options.onProgress && result.rowsTotal % progressEvery === 0) {
        await options.onProgress(result.rowsTotal);
      }
    }
    if (columns === null && result.fatal === null) {
      result.fatal = 'the file is empty: it has no header row';
      addRejection({ line: 1, column: '', value: '', reason: result.fatal });
    }
    if (rules.deferred && result.fatal === null) {
      rules.finish?.((l, field, value, reason) => {
        if (!rejectedLines.has(l)) {
          rejectedLines.add(l);
          result.rowsRejected++;
        }
        addRejection({ line: l, column: columns!.header.get(field) ?? field, value, reason });
      });
      for (const row of held) {
        if (rejectedLines.has(row.line)) continue;
        buffer += row.row;
        result.rowsAccepted++;
        if (buffer.length > 65_536) await flush();
      }
    }
    await flush();
  } catch (error) {
    if (
      !(error as { code?: string }).code?.startsWith('CSV_') &&
      !(error as { code?: string }).code?.startsWith('INVALID_')
    ) {
      throw error;
    }
    result.fatal = `line ${(error as { lines?: number }).lines ?? '?'}: ${describeCsvError(error as Error)}`;
    addRejection({
      line: (error as { lines?: number }).lines ?? 0,
      column: '',
      value: '',
      reason: result.fatal,
    });
  } finally {
    source.destroy();
    parser.destroy();
    out.end();
    await outClosed;
  }
  if (result.fatal !== null) {
    result.rowsAccepted = 0;
  }
  result.rejections.sort((a, b) => a.line - b.line);
  return result;
}

/**
 * Refuses control characters and over-long text in the mapped cells, each with its
 * column; the row's own rules run only when these pass.
 */
function checkText(
  columns: ResolvedColumns,
  cells: string[],
  quoted: (index: number) => boolean,
  reject: (field: string, value: string, reason: string) => void,
): boolean {
  let ok = true;
  for (const [field, i] of columns.index) {
    const value = cells[i] ?? '';
    const shown = field === 'student_id' ? WITHHELD_STUDENT_ID : value;
    if (value.includes('\t') && !quoted(i)) {
      reject(
        field,
        shown,
        'holds a tab outside quotes; put the cell in double quotes or remove the tab',
      );
      ok = false;
      continue;
    }
    const control = CONTROL.exec(value);
    if (control) {
      reject(
        field,
        // eslint-disable-next-line no-control-regex -- shown without the characters it refuses
        field === 'student_id' ? shown : value.replace(/[\u0000-\u001f\u007f]/g, ' '),
        `holds a control character (${controlName(control[0])}) at position ${control.index + 1}; remove it`,
      );
      ok = false;
      continue;
    }
    const limit = TEXT_LIMITS[field];
    if (limit !== undefined && value.trim().length > limit) {
      reject(
        field,
        shown,
        `is ${value.trim().length.toLocaleString('en')} characters long; ${field} holds at most ${limit.toLocaleString('en')}`,
      );
      ok = false;
    }
  }
  return ok;
}

/** csv-parse's messages quote the cell, which may be a student number: say what is wrong, not what was there. */
export function describeCsvError(error: Error & { code?: string }): string {
  switch (error.code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return 'a quoted field is not closed before the end of the file';
    case 'INVALID_OPENING_QUOTE':
      return 'a quote appears inside a field that does not start with a quote';
    case 'CSV_INVALID_CLOSING_QUOTE':
      return 'a closing quote is followed by something other than a delimiter or the end of the line';
    case 'CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE':
      return 'characters follow a closing quote';
    default:
      return 'the row cannot be read as CSV';
  }
}
