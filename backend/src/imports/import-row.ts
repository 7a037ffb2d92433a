import type { ImportKind, ImportLeftOut, ImportStatus, ImportSummary } from '@kinpath/contracts';

/** A row of `imports` joined with the e-mails of the people named in it. */
export interface ImportRow {
  id: string;
  kind: ImportKind;
  status: ImportStatus;
  file_name: string;
  file_digest: string;
  file_bytes: string;
  mapping: Record<string, string> | null;
  delimiter: string | null;
  commit_requested: boolean;
  partial: boolean;
  rows_total: number | null;
  rows_accepted: number | null;
  rows_rejected: number | null;
  progress_phase: 'validating' | 'committing' | null;
  progress_done: number;
  progress_total: number | null;
  message: string | null;
  created_at: Date;
  created_by_email: string | null;
  committed_at: Date | null;
  committed_by_email: string | null;
  rolled_back_at: Date | null;
  rolled_back_by_email: string | null;
  discarded_at: Date | null;
  discarded_by_email: string | null;
  left_out: ImportLeftOut | null;
  validation_ms: number | null;
  commit_ms: number | null;
  model_refreshed_at: Date | null;
}

export const IMPORT_SELECT = `
  SELECT i.*, cu.email AS created_by_email, mu.email AS committed_by_email,
         ru.email AS rolled_back_by_email, du.email AS discarded_by_email
  FROM imports i
  LEFT JOIN users cu ON cu.id = i.created_by
  LEFT JOIN users mu ON mu.id = i.committed_by
  LEFT JOIN users ru ON ru.id = i.rolled_back_by
  LEFT JOIN users du ON du.id = i.discarded_by`;

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

export function toSummary(row: ImportRow): ImportSummary {
  const durationMs =
    row.validation_ms === null && row.commit_ms === null
      ? null
      : (row.validation_ms ?? 0) + (row.commit_ms ?? 0);
  return {
    id: row.id,
    kind: row.kind,
    status: row.status,
    fileName: row.file_name,
    fileDigest: row.file_digest,
    mapping: row.mapping,
    rowsTotal: row.rows_total,
    rowsAccepted: row.rows_accepted,
    rowsRejected: row.rows_rejected,
    progress: { phase: row.progress_phase, done: row.progress_done, total: row.progress_total },
    partial: row.partial,
    commitRequested: row.commit_requested,
    message: row.message,
    createdAt: iso(row.created_at) as string,
    createdBy: row.created_by_email,
    committedAt: iso(row.committed_at),
    committedBy: row.committed_by_email,
    rolledBackAt: iso(row.rolled_back_at),
    rolledBackBy: row.rolled_back_by_email,
    discardedAt: iso(row.discarded_at),
    discardedBy: row.discarded_by_email,
    leftOut: row.left_out,
    rejectedRowsAvailable: row.status === 'validated' && (row.rows_rejected ?? 0) > 0,
    durationMs,
    validationMs: row.validation_ms,
    commitMs: row.commit_ms,
    modelRefreshedAt: iso(row.model_refreshed_at),
  };
}
