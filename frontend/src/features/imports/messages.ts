import type { ImportEncoding, ImportKind, ImportPreview, ImportSummary } from '@kinpath/contracts';
import { IMPORT_FIELDS } from '@kinpath/contracts';
import { apiDetails, apiMessage, httpStatus } from '../../lib/api-client';
import { KIND_DATA, KIND_KEYS, KIND_LABELS, dateTime, formatCount, rows } from './words';

export interface UploadFailure {
  text: string;
  /** The import that holds the same file already (a 409), to link to. */
  earlierImportId?: string;
}

const UUID = /[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}/i;

/** What went wrong with an upload, in a sentence the registrar can act on. */
export function uploadFailure(error: unknown): UploadFailure {
  const status = httpStatus(error);
  const message = apiMessage(error);
  if (status === 409) {
    const earlierImportId = apiDetails(error)?.earlierImportId ?? message?.match(UUID)?.[0];
    return {
      text:
        message ??
        'This file was committed before, so it was not imported again. Roll that import back first if the file should replace it.',
      earlierImportId,
    };
  }
  if (status === 422 && message) return { text: message };
  if (status === 413) {
    const limit = message?.match(/(\d+(?:\.\d+)?)\s*MB/)?.[1];
    return {
      text: limit
        ? `The file is larger than the upload limit of ${limit} MB. Split it into smaller files, or ask whoever runs Kinpath to raise the limit.`
        : 'The file is larger than the upload limit. Split it into smaller files, or ask whoever runs Kinpath to raise the limit.',
    };
  }
  if (status === 400) {
    return {
      text: `The server could not take this upload: ${message ?? 'the request was refused.'}`,
    };
  }
  if (status === 403) return { text: 'Only registrar staff can import files.' };
  if (status === undefined) {
    return { text: 'The upload did not reach the server. Check the connection and try again.' };
  }
  return { text: 'The upload failed on the server. Try again in a moment.' };
}

/** Commit, rollback and discard refusals (409) carry the reason; other failures get a plain line. */
export function actionFailure(error: unknown, action: 'commit' | 'rollback' | 'discard'): string {
  const message = apiMessage(error);
  const status = httpStatus(error);
  if ((status === 409 || status === 400) && message) return message;
  return action === 'commit'
    ? 'The commit could not be started. Try again in a moment.'
    : action === 'discard'
      ? 'The import could not be discarded. Try again in a moment.'
      : 'The rollback failed; nothing was changed. Try again in a moment.';
}

/** The confirmation before a discard: nothing was written, the file goes, the history stays. */
export function discardConfirmation(summary: ImportSummary): string {
  return (
    `Discard the ${KIND_LABELS[summary.kind].toLowerCase()} import of ${summary.fileName}. ` +
    'Nothing of it was written to the term data. The uploaded file is removed from the server, and the import stays in the history as discarded, so the same file can be uploaded again.'
  );
}

/** Columns of the file that no field took, and optional fields no column gave, in a sentence. */
export function leftOutSentence(leftOut: { columns: string[]; fields: string[] }): string | null {
  const parts: string[] = [];
  if (leftOut.columns.length) {
    parts.push(
      `Not imported: the file’s ${leftOut.columns.length === 1 ? 'column' : 'columns'} ${leftOut.columns.map((c) => `‘${c}’`).join(', ')} ${leftOut.columns.length === 1 ? 'was' : 'were'} mapped to no field.`,
    );
  }
  if (leftOut.fields.length) {
    parts.push(
      `Left empty in every row: ${leftOut.fields.join(', ')} (no column of the file gave ${leftOut.fields.length === 1 ? 'it' : 'them'}).`,
    );
  }
  return parts.length ? parts.join(' ') : null;
}

/** The confirmation before a commit: what goes in, what stays out, and how it can be undone. */
export function commitConfirmation(summary: ImportSummary): string {
  const accepted = summary.rowsAccepted ?? 0;
  const rejected = summary.rowsRejected ?? 0;
  const out =
    rejected === 0
      ? 'no row was rejected.'
      : `${rows(rejected, 'rejected row')} ${rejected === 1 ? 'stays' : 'stay'} out.`;
  const estimates =
    summary.kind === 'records' ? ' Estimates are rebuilt from the new term data afterwards.' : '';
  return (
    `Commit ${rows(accepted, 'accepted row')} of ${KIND_DATA[summary.kind]}; ${out} ` +
    `Existing rows with ${KIND_KEYS[summary.kind]} are replaced; rollback restores them.${estimates}`
  );
}

/** The confirmation before a rollback: which import, and what it restores. */
export function rollbackConfirmation(summary: ImportSummary): string {
  const accepted = summary.rowsAccepted ?? 0;
  return (
    `Roll back the ${KIND_LABELS[summary.kind].toLowerCase()} import of ${summary.fileName} ` +
    `(${rows(accepted)} committed ${dateTime(summary.committedAt)}). ` +
    'The rows it added are removed and the rows it replaced get their earlier values back. ' +
    'If a later import replaced the same rows, that import has to be rolled back first.'
  );
}

export function commitButtonLabel(summary: ImportSummary): string {
  return `Commit ${formatCount(summary.rowsAccepted ?? 0)} ${
    summary.rowsAccepted === 1 ? 'row' : 'rows'
  }`;
}

/** A header as the server matches it against field names: lower case, punctuation as `_`. */
export function headerKey(header: string): string {
  return header
    .trim()
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '');
}

/** Field to the file's header, as the mapping screen edits it; '' for a field not in the file. */
export type FieldColumns = Record<string, string>;

export function columnsFromSuggestion(kind: ImportKind, preview: ImportPreview): FieldColumns {
  const suggested = preview.suggestedMappings[kind] ?? {};
  const columns: FieldColumns = {};
  for (const field of IMPORT_FIELDS[kind]) {
    columns[field.name] = Object.keys(suggested).find((h) => suggested[h] === field.name) ?? '';
  }
  return columns;
}

/**
 * True when the file's headers are not simply the kind's default names: a required field is
 * missing, or a column was matched under another name.
 */
export function headersDiffer(kind: ImportKind, preview: ImportPreview): boolean {
  if ((preview.missingFields[kind] ?? []).length > 0) return true;
  const suggested = preview.suggestedMappings[kind] ?? {};
  return Object.entries(suggested).some(([header, field]) => headerKey(header) !== field);
}

/** The mapping as the API takes it: the file's header to the field it holds. */
export function toMapping(columns: FieldColumns): Record<string, string> {
  const mapping: Record<string, string> = {};
  for (const [field, header] of Object.entries(columns)) if (header) mapping[header] = field;
  return mapping;
}

/** A saved mapping applied to this file: only headers the file has; the rest left unmapped. */
export function columnsFromSaved(
  kind: ImportKind,
  saved: Record<string, string>,
  headers: readonly string[],
): FieldColumns {
  const columns: FieldColumns = {};
  for (const field of IMPORT_FIELDS[kind]) {
    const header = Object.keys(saved).find((h) => saved[h] === field.name && headers.includes(h));
    columns[field.name] = header ?? '';
  }
  return columns;
}

/** Problems with a mapping, by field: required fields left out, a column given twice. */
export function mappingProblems(kind: ImportKind, columns: FieldColumns): Record<string, string> {
  const problems: Record<string, string> = {};
  for (const field of IMPORT_FIELDS[kind]) {
    const header = columns[field.name] ?? '';
    if (field.required && !header) {
      problems[field.name] = `Choose the column that holds ${field.name}.`;
      continue;
    }
    const other = IMPORT_FIELDS[kind].find(
      (f) => f.name !== field.name && header && columns[f.name] === header,
    );
    if (other) problems[field.name] = `Column ‘${header}’ is chosen for ${other.name} too.`;
  }
  return problems;
}

/** A file that is not UTF-8: the encoding the server detected, for the registrar to confirm. */
export function encodingQuestion(
  error: unknown,
): { encoding: ImportEncoding; name: string; message: string } | null {
  const details = apiDetails(error);
  if (httpStatus(error) !== 422 || !details?.detectedEncoding) return null;
  return {
    encoding: details.detectedEncoding as ImportEncoding,
    name: details.encodingName ?? details.detectedEncoding,
    message: apiMessage(error) ?? '',
  };
}

/** What the mapping leaves out: columns of the file that no field takes, optional fields no column gives. */
export function leftOutOf(
  kind: ImportKind,
  headers: readonly string[],
  columns: FieldColumns,
): { columns: string[]; fields: string[] } {
  const used = new Set(Object.values(columns).filter(Boolean));
  return {
    columns: headers.filter((h) => h.trim() !== '' && !used.has(h)),
    fields: IMPORT_FIELDS[kind].filter((f) => !f.required && !columns[f.name]).map((f) => f.name),
  };
}
