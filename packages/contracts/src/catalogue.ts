/** A course of the catalogue as `GET /api/courses` lists it. */
export interface CourseSummary {
  courseCode: string;
  title: string;
  department: string;
  credits: number | null;
  level: string | null;
  elective: boolean;
  /** Course codes joined by AND / OR with parentheses; empty means none. */
  prerequisites: string;
  description: string | null;
}

export interface TermSummary {
  term: string;
  records: number;
  offerings: number;
}

/** `GET /api/terms`: every known term in time order, the current term and the next one. */
export interface TermsResponse {
  terms: TermSummary[];
  /** The latest term with records; null before any term data. */
  current: string | null;
  /** The first term after `current` with offerings, else the term that follows it. */
  next: string | null;
}
