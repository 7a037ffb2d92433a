import { DEFAULT_STUDENT_NUMBER_PATTERN, studentNumberFinder } from '../../config/config';

/** Stored and shown wherever a student number would have been (data.md, privacy by design). */
export const STUDENT_NUMBER_MARK = '[student number]';

/** The text with everything that looks like a student number replaced by the mark. */
export function withholdStudentNumbers(
  text: string,
  pattern: string = DEFAULT_STUDENT_NUMBER_PATTERN,
): string {
  if (text === '' || text === STUDENT_NUMBER_MARK) return text;
  return text.replace(studentNumberFinder(pattern), STUDENT_NUMBER_MARK);
}

/** Whether a whole cell reads as a student number. */
export function looksLikeStudentNumber(
  text: string,
  pattern: string = DEFAULT_STUDENT_NUMBER_PATTERN,
): boolean {
  return withholdStudentNumbers(text.trim(), pattern) === STUDENT_NUMBER_MARK;
}
