import type { ImportKind, ImportStatus, ImportSummary } from '@kinpath/contracts';

/** The kinds as registrar staff name them; a records import is "term data" (product.md). */
export const KIND_LABELS: Record<ImportKind, string> = {
  catalogue: 'Catalogue',
  offerings: 'Offerings',
  students: 'Students',
  records: 'Term data',
};

/** What a kind's rows are, inside a sentence: "1,204 accepted rows of term data". */
export const KIND_DATA: Record<ImportKind, string> = {
  catalogue: 'catalogue data',
  offerings: 'offerings',
  students: 'student data',
  records: 'term data',
};

/** The key that decides whether a row replaces an existing one (data.md). */
export const KIND_KEYS: Record<ImportKind, string> = {
  catalogue: 'the same course code',
  offerings: 'the same term and course code',
  students: 'the same student',
  records: 'the same student, term and course',
};

/** The order imports depend on each other, with what each one brings. */
export const IMPORT_ORDER: readonly { kind: ImportKind; what: string }[] = [
  {
    kind: 'catalogue',
    what: 'courses with their department, credits, whether they are electives, and prerequisites.',
  },
  { kind: 'offerings', what: 'which courses run in which term, with sections and seats.' },
  {
    kind: 'students',
    what: 'program, entry term and status. Student numbers are replaced by pseudonyms as they are imported.',
  },
  {
    kind: 'records',
    what: 'each student’s grade and satisfaction per course and term, the records every estimate rests on.',
  },
];

const STATUS_LABELS: Record<ImportStatus, string> = {
  queued: 'Waiting',
  validating: 'Checking rows',
  validated: 'Checked, not committed',
  committing: 'Committing',
  committed: 'Committed',
  failed: 'Failed',
  rolled_back: 'Rolled back',
  discarded: 'Discarded',
};

/** The status in words; a commit of only the accepted rows says so. */
export function statusLabel(summary: Pick<ImportSummary, 'status' | 'partial'>): string {
  if (summary.status === 'committed' && summary.partial) return 'Committed, partial';
  return STATUS_LABELS[summary.status];
}

/** While an import is in one of these, its job is running and the page keeps asking. */
export const RUNNING_STATUSES: readonly ImportStatus[] = ['queued', 'validating', 'committing'];

export function isRunning(status: ImportStatus | undefined): boolean {
  return status !== undefined && RUNNING_STATUSES.includes(status);
}

/** How long after a commit or rollback the page keeps asking whether the estimates caught up. */
const MODEL_WAIT_MS = 10 * 60_000;

/**
 * True while the estimates have not yet been rebuilt after this import's last change (commit
 * or rollback), for a while after that change.
 */
export function awaitingModel(summary: ModelFields, now = Date.now()): boolean {
  const changedAt = lastChange(summary);
  if (!changedAt || now - new Date(changedAt).getTime() > MODEL_WAIT_MS) return false;
  return !modelCaughtUpWith(summary);
}

type ModelFields = Pick<
  ImportSummary,
  'status' | 'committedAt' | 'rolledBackAt' | 'modelRefreshedAt'
>;

/** When the import last changed the term data: its commit, or its rollback. */
function lastChange(summary: ModelFields): string | null {
  if (summary.status === 'committed') return summary.committedAt;
  if (summary.status === 'rolled_back') return summary.rolledBackAt;
  return null;
}

/** Whether the estimates were rebuilt after the import's last change (a rollback too). */
export function modelCaughtUpWith(summary: ModelFields): boolean {
  const changedAt = lastChange(summary);
  if (!changedAt || !summary.modelRefreshedAt) return false;
  return new Date(summary.modelRefreshedAt).getTime() >= new Date(changedAt).getTime();
}

const COUNT = new Intl.NumberFormat('en-US');

export function formatCount(value: number): string {
  return COUNT.format(value);
}

/** "1 row", "1,204 rows". */
export function rows(count: number, noun = 'row'): string {
  return `${formatCount(count)} ${count === 1 ? noun : `${noun}s`}`;
}

/** One date form for every screen. */
export { dateTime } from '../../lib/format';

/** Milliseconds as "45 ms", "12.0 s" or "3 min 05 s". */
export function duration(ms: number | null): string {
  if (ms === null) return '—';
  if (ms < 1000) return `${Math.round(ms)} ms`;
  if (ms < 60_000) return `${(ms / 1000).toFixed(1)} s`;
  const minutes = Math.floor(ms / 60_000);
  const seconds = Math.round((ms - minutes * 60_000) / 1000);
  return `${minutes} min ${String(seconds).padStart(2, '0')} s`;
}

/** Bytes as "812 B", "14.2 KB", "3.1 MB". */
export function fileSize(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
}
