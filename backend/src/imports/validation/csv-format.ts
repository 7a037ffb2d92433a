import { createReadStream } from 'node:fs';
import { parse } from 'csv-parse';

export type Delimiter = ',' | ';';

/**
 * The delimiter is whichever of comma and semicolon the header line holds more
 * of, outside quotes; a header with neither (one column) reads as comma-separated.
 */
export function detectDelimiter(headerLine: string): Delimiter {
  let commas = 0;
  let semicolons = 0;
  let quoted = false;
  for (const char of headerLine) {
    if (char === '"') quoted = !quoted;
    else if (!quoted && char === ',') commas++;
    else if (!quoted && char === ';') semicolons++;
  }
  return semicolons > commas ? ';' : ',';
}

/** Reads the first line of a file (up to 64 KiB), without a byte-order mark. */
export async function readHeaderLine(path: string): Promise<string> {
  const stream = createReadStream(path, { start: 0, end: 65535, encoding: 'utf8' });
  let text = '';
  for await (const chunk of stream) {
    text += chunk as string;
    if (/[\r\n]/.test(text)) break;
  }
  stream.destroy();
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  return text.split(/\r?\n|\r/, 1)[0] ?? '';
}

/** How a header is compared with a field name: case, blanks and punctuation do not matter. */
export function headerKey(header: string): string {
  return header
    .trim()
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '');
}

/**
 * Whether field `index` of a record's raw text starts with a quote. Read only for a
 * row with a tab in it (a tab is allowed inside quotes only), so the parser keeps its
 * fast path for every other row.
 */
export function fieldIsQuoted(raw: string, delimiter: Delimiter, index: number): boolean {
  let field = 0;
  let start = true;
  let quoted = false;
  for (const char of raw) {
    if (start) {
      if (field === index) return char === '"';
      start = false;
    }
    if (char === '"') quoted = !quoted;
    else if (char === delimiter && !quoted) {
      field++;
      start = true;
    }
  }
  return false;
}

/** A streaming parser with the options every import uses: BOM, quotes, CRLF, ragged rows. */
export function csvParser(delimiter: Delimiter, options: { toLine?: number } = {}) {
  return parse({
    raw: true,
    delimiter,
    bom: true,
    info: true,
    relax_column_count: true,
    skip_empty_lines: true,
    skip_records_with_error: true,
    to_line: options.toLine,
  });
}

/** Quotes a value for PostgreSQL's CSV COPY; null is an unquoted empty field. */
export function copyCell(value: string | null): string {
  if (value === null) return '';
  if (value === '') return '""';
  if (/[",\r\n]/.test(value) || value.trim() !== value) return `"${value.replace(/"/g, '""')}"`;
  return value;
}

/** A cell of a CSV report: formulas are neutralised so a spreadsheet shows them as text. */
export function reportCell(value: string): string {
  const safe = /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}
