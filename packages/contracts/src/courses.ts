/** Course codes: letters then digits, one optional space; stored as `CMP 2310` (data.md). */
export const COURSE_CODE_PATTERN = /^([A-Za-z]{2,6}) ?(\d{3,5})$/;

/** The stored form of a course code, or null when the value is not one. */
export function normalizeCourseCode(value: string): string | null {
  const match = COURSE_CODE_PATTERN.exec(value.trim());
  return match ? `${match[1].toUpperCase()} ${match[2]}` : null;
}

export const STUDENT_STATUSES = ['active', 'graduated', 'withdrawn', 'on_leave'] as const;
export type StudentStatus = (typeof STUDENT_STATUSES)[number];
