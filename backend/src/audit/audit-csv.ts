import type { AuditEntry } from '@kinpath/contracts';
import { stringify } from 'csv-stringify/sync';

/**
 * A cell a spreadsheet would run as a formula (=, +, -, @, tab, carriage return)
 * gets a leading apostrophe, so an exported trail cannot carry code into the office.
 */
export function neutraliseFormula(value: string): string {
  return /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
}

export const AUDIT_CSV_HEADER = [
  'at',
  'actor_email',
  'actor_id',
  'action',
  'target',
  'detail',
  'target_label',
];

export function auditCsv(entries: AuditEntry[]): string {
  const rows = entries.map((e) =>
    [
      e.at,
      e.actorEmail ?? '',
      e.actorId ?? '',
      e.action,
      e.target ?? '',
      Object.keys(e.detail).length > 0 ? JSON.stringify(e.detail) : '',
      e.targetLabel ?? '',
    ].map(neutraliseFormula),
  );
  return stringify([AUDIT_CSV_HEADER, ...rows], { quoted_string: true, record_delimiter: '\r\n' });
}
