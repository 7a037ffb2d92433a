/** One department a head may be responsible for: the catalogue's, or one an admin added. */
export interface DepartmentEntry {
  code: string;
  name: string | null;
  /** Courses of the catalogue in this department. */
  courses: number;
  /** Added by an admin (removable while no course and no head uses it). */
  added: boolean;
  /** Department heads scoped to it. */
  heads: number;
}

/** `POST /api/departments`: an admin adds a department the catalogue does not list yet. */
export interface AddDepartmentRequest {
  code: string;
  name?: string;
}

/** The refusal when a head is given a code that is on no list. */
export function unknownDepartmentMessage(code: string): string {
  return `${code} is not a department of the catalogue. Choose one from the list, or add it under Departments first.`;
}
