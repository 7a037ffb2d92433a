import type { StudentStatus } from './courses';

/**
 * The advisor's workspace (api.md, `/api/students/...`). A student is named by
 * an opaque `ref` the lookup hands out; the student number never travels in a URL.
 */

export interface StudentLookupRequest {
  studentId: string;
}

export interface StudentLookupResponse {
  /** Opaque and stable handle for this student, used in every later URL. */
  ref: string;
  program: string | null;
  status: StudentStatus;
  entryTerm: string | null;
}

export const STUDENT_NOT_FOUND_MESSAGE = 'No records for this student number.';

/** `GET /api/students/recent`: this advisor's latest lookups, newest first, never by number. */
export interface RecentStudent extends StudentLookupResponse {
  lookedUpAt: string;
}

/** `GET /api/students/:ref`: the header of the student page. */
export interface StudentHeader extends StudentLookupResponse {
  /** Credits of the courses passed, each course counted once. */
  creditsEarned: number;
  /** Credit-weighted grade points of the latest graded attempt of each course; null without any. */
  gradePointAverage: number | null;
  /** Attempts on record, marks included. */
  attempts: number;
}

/** `GET /api/students/:ref/history`: every attempt, in term order. */
export interface HistoryEntry {
  term: string;
  courseCode: string;
  title: string;
  /** As recorded: a letter, a mark (W, P, …) or grade points. */
  grade: string;
  gradePoints: number | null;
  satisfaction: number | null;
  creditsAttempted: number | null;
}

export type EstimateBasis = 'neighbours' | 'baseline' | 'none';
export type EstimateConfidence = 'low' | 'medium' | 'high';
export type FitBasis = 'both' | 'grade' | 'satisfaction';

export const INELIGIBLE_REASON_CODES = [
  'already_passed',
  'prerequisite_not_passed',
  'not_offered',
] as const;
export type IneligibleReasonCode = (typeof INELIGIBLE_REASON_CODES)[number];

export interface IneligibleReason {
  code: IneligibleReasonCode;
  /** One sentence for the advisor, e.g. "Prerequisite not passed: CMP 2210." */
  message: string;
}

/**
 * An 80 % likely range: past estimates like this one (similar record count and kin
 * strength) missed the outcome by this much or less four times in five.
 */
export interface LikelyRange {
  low: number;
  high: number;
  /** Grade letters for grades ("B-"), the value itself for satisfaction ("3.2"). */
  lowLabel: string;
  highLabel: string;
}

/** One elective with its estimates for one student. */
export interface ElectiveEstimate {
  courseCode: string;
  title: string;
  department: string;
  credits: number | null;
  /** Whether the course is offered in the response's term. */
  offered: boolean;
  eligible: boolean;
  ineligibleReasons: IneligibleReason[];
  /** Grade points; null when the grade basis is none. */
  predictedGrade: number | null;
  /** The scale's letter nearest to `predictedGrade`. */
  predictedGradeLetter: string | null;
  /** 1-5; null when the satisfaction basis is none. */
  predictedSatisfaction: number | null;
  /** 0-100; null when neither signal has an estimate. */
  fit: number | null;
  /** The signals the fit rests on; null without a fit. */
  fitBasis: FitBasis | null;
  confidence: EstimateConfidence;
  /**
   * `neighbours` when every shown value comes from kin, `none` when nothing is
   * shown, otherwise `baseline` (at least one value is the course-and-student baseline).
   */
  basis: EstimateBasis;
  /** Basis of each signal on its own. */
  bases: { grade: EstimateBasis; satisfaction: EstimateBasis };
  /** Kin counts (contributing neighbours) per signal. */
  neighbours: { grade: number; satisfaction: number };
  /**
   * Kin strength per signal: the kin's summed similarity (0 on the baseline). Two estimates
   * with 30 kin each differ here when one set of kin is much more alike.
   */
  kinStrength: { grade: number; satisfaction: number };
  /** Likely ranges per signal; null when there is no estimate or no range yet. */
  likelyRange: { grade: LikelyRange | null; satisfaction: LikelyRange | null };
}

/**
 * `GET /api/students/:ref/electives?term=&includeNotOffered=`: the electives
 * offered in the term (default the next term), or every elective of the
 * catalogue with `includeNotOffered=true` (those not offered say so).
 */
export interface ElectivesResponse {
  term: string;
  /** The model settings version these estimates were computed with. */
  settingsVersion: number;
  /** How confidence is decided, in plain words, to show beside the score. */
  confidenceRule: string;
  /** When the model behind these estimates was built from the term data. */
  modelBuiltAt: string;
  electives: ElectiveEstimate[];
}

export interface OutcomeCount {
  value: number;
  /** The grade letter for grade points; the value itself for satisfaction. */
  label: string;
  count: number;
}

export interface SharedCourse {
  courseCode: string;
  title: string;
  /**
   * Share of the positive part of the kin's likeness this course built up (0-1): the shares
   * of all courses that made the kin alike add up to 1. Courses where the kin differed from
   * the student pulled the likeness down instead; see `SignalExplanation.againstShare`.
   */
  contribution: number;
}

/** Why one signal's estimate is what it is. */
export interface SignalExplanation {
  value: number | null;
  basis: EstimateBasis;
  /** Contributing kin. */
  kinCount: number;
  similarityRange: { min: number; max: number } | null;
  /** |w|-weighted standard deviation of the kin's results relative to their own averages. */
  spread: number | null;
  /** The kin's results in this course; null when fewer than 5 contributed. */
  outcomes: OutcomeCount[] | null;
  /** Why the outcomes are not shown, when they are not. */
  outcomesSuppressed: string | null;
  /** The shared courses that made these students alike, strongest first (at most 5). */
  sharedCourses: SharedCourse[];
  /**
   * How much courses where the kin differed took away, as a share of the positive part
   * (0 when none did): the likeness is (1 - againstShare) of what the listed shares add to.
   */
  againstShare: number;
  /** Kin strength: the kin's summed similarity. */
  kinStrength: number;
  likelyRange: LikelyRange | null;
  confidence: EstimateConfidence;
}

/** `GET /api/students/:ref/electives/:courseCode/explanation`. */
export interface ElectiveExplanation {
  courseCode: string;
  title: string;
  settingsVersion: number;
  /** The method, named for those who want it, and what it does in plain words. */
  method: { name: string; similarity: string; description: string };
  /** Minimum kin before their results are shown (small-cell suppression). */
  disclosureMinimum: number;
  grade: SignalExplanation;
  satisfaction: SignalExplanation;
}

export const NOTE_MAX_LENGTH = 4000;

export interface AdvisingNote {
  id: string;
  text: string;
  createdAt: string;
  /** When its author last changed it; null if never. */
  editedAt: string | null;
  authorName: string;
  authorEmail: string;
}

/** A summary e-mailed to the student, as the student page lists them: never a student number. */
export interface SentSummary {
  id: string;
  sentAt: string;
  to: string;
  term: string;
  courseCodes: string[];
  senderName: string;
}

export interface CreateNoteRequest {
  text: string;
}

export interface ShortlistItem {
  courseCode: string;
  title: string;
  addedAt: string;
  addedByName: string;
  addedByEmail: string;
}

/** `GET/PUT /api/students/:ref/shortlist`, shared by every advisor of the student. */
export interface Shortlist {
  courseCodes: string[];
  items: ShortlistItem[];
  /** The last change: when and by whom; null before any. */
  updatedAt: string | null;
  updatedByName: string | null;
  updatedByEmail: string | null;
}

export const SHORTLIST_MAX_ITEMS = 30;

export interface UpdateShortlistRequest {
  courseCodes: string[];
}

export const SUMMARY_MESSAGE_MAX_LENGTH = 2000;

/** `POST /api/students/:ref/summary`. */
export interface SummaryRequest {
  /** The student's e-mail address, typed by the advisor. */
  to: string;
  courseCodes: string[];
  /** The advisor's own words, put above the estimates. */
  message?: string;
  /** The term the estimates are for; default the next term. */
  term?: string;
}

export interface SummaryResponse {
  to: string;
  subject: string;
  term: string;
  courseCodes: string[];
  sentAt: string;
}
