/**
 * Registrar imports (data.md, "An import, start to end"; api.md `/api/imports`).
 * Field and status names are part of the API contract: add freely, rename never.
 */
export const IMPORT_KINDS = ['catalogue', 'offerings', 'students', 'records'] as const;
export type ImportKind = (typeof IMPORT_KINDS)[number];

export const IMPORT_STATUSES = [
  'queued',
  'validating',
  'validated',
  'committing',
  'committed',
  'failed',
  'rolled_back',
  'discarded',
] as const;
export type ImportStatus = (typeof IMPORT_STATUSES)[number];

export interface ImportFieldSpec {
  name: string;
  required: boolean;
}

/** The columns of each kind, in the order data.md lists them. */
export const IMPORT_FIELDS: Record<ImportKind, readonly ImportFieldSpec[]> = {
  catalogue: [
    { name: 'course_code', required: true },
    { name: 'title', required: true },
    { name: 'department', required: true },
    { name: 'credits', required: false },
    { name: 'level', required: false },
    { name: 'elective', required: false },
    { name: 'prerequisites', required: false },
    { name: 'description', required: false },
  ],
  offerings: [
    { name: 'term', required: true },
    { name: 'course_code', required: true },
    { name: 'sections', required: false },
    { name: 'capacity', required: true },
  ],
  students: [
    { name: 'student_id', required: true },
    { name: 'program', required: false },
    { name: 'entry_term', required: false },
    { name: 'status', required: false },
  ],
  records: [
    { name: 'student_id', required: true },
    { name: 'term', required: true },
    { name: 'course_code', required: true },
    { name: 'grade', required: true },
    { name: 'satisfaction', required: false },
    { name: 'credits_attempted', required: false },
  ],
};

/** A column mapping: the file's header to the field it holds. Unmapped headers are ignored. */
export type ImportMapping = Record<string, string>;

/** Rows done so far, and the total when it is known (after validation has counted them). */
export interface ImportProgress {
  phase: 'validating' | 'committing' | null;
  done: number;
  total: number | null;
}

export interface ImportSummary {
  id: string;
  kind: ImportKind;
  status: ImportStatus;
  /** The file's name, with anything shaped like a student number withheld. */
  fileName: string;
  /** The mapping the file was checked with (file header to field), or null for the default names. */
  mapping: ImportMapping | null;
  /** Keyed digest of the file (HMAC under the pseudonym key) that finds the same file again. */
  fileDigest: string;
  rowsTotal: number | null;
  rowsAccepted: number | null;
  rowsRejected: number | null;
  progress: ImportProgress;
  /** True when only the accepted rows of a file with rejections were committed. */
  partial: boolean;
  /** Commit was asked for at upload; it happens only when no row is rejected. */
  commitRequested: boolean;
  /** Why the import failed or was not committed, in a sentence. */
  message: string | null;
  createdAt: string;
  createdBy: string | null;
  committedAt: string | null;
  committedBy: string | null;
  rolledBackAt: string | null;
  rolledBackBy: string | null;
  discardedAt: string | null;
  discardedBy: string | null;
  /**
   * Set once validated: file columns that the mapping gave to no field, and the
   * kind's optional fields that no column gave (left empty in every row).
   */
  leftOut: ImportLeftOut | null;
  /** While the upload is kept (validated, not yet committed or discarded): the rejected rows can be downloaded whole. */
  rejectedRowsAvailable: boolean;
  /** Validation plus commit time, in milliseconds. */
  durationMs: number | null;
  validationMs: number | null;
  commitMs: number | null;
  /** When the advising model was last rebuilt after this import's commit or rollback. */
  modelRefreshedAt: string | null;
}

export interface ImportLeftOut {
  columns: string[];
  fields: string[];
}

/** The answer to `POST /api/imports`. */
export interface ImportAccepted {
  id: string;
  status: ImportStatus;
}

/** One rejected cell: the file's line (the header is line 1) and column; never a raw student id. */
export interface ImportRejection {
  line: number;
  column: string;
  value: string;
  reason: string;
}

/** The answer to `POST /api/imports/preview`, for the mapping screen. */
export interface ImportPreview {
  delimiter: ',' | ';';
  headers: string[];
  rows: string[][];
  /** For each kind, the suggested mapping of the file's headers to the kind's fields. */
  suggestedMappings: Record<ImportKind, ImportMapping>;
  /** For each kind, the required fields no header matches yet. */
  missingFields: Record<ImportKind, string[]>;
  /** The kind whose required columns the headers all give, when exactly one does. */
  likelyKind: ImportKind | null;
  /** The encoding the file was read in (UTF-8 unless another was confirmed). */
  encoding: ImportEncoding;
}

/** Encodings a file may be read in; any but UTF-8 only when the registrar confirms it. */
export const IMPORT_ENCODINGS = [
  'utf-8',
  'windows-1252',
  'latin-1',
  'utf-16le',
  'utf-16be',
] as const;
export type ImportEncoding = (typeof IMPORT_ENCODINGS)[number];

/** `details` of the answer (422) to a file that is not UTF-8 and whose encoding was not confirmed. */
export interface ImportEncodingQuestion {
  detectedEncoding: ImportEncoding;
  encodingName: string;
}

export interface SavedImportMapping {
  id: string;
  name: string;
  kind: ImportKind;
  mapping: ImportMapping;
  createdAt: string;
  createdBy: string | null;
}

export interface SaveImportMappingRequest {
  name: string;
  kind: ImportKind;
  mapping: ImportMapping;
}
