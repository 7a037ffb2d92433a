import { describe, expect, it } from 'vitest';
import { looksLikeStudentNumber, withholdStudentNumbers } from './withhold';

describe('withholding student numbers', () => {
  it('replaces numbers of the default form wherever they stand, and nothing else', () => {
    expect(withholdStudentNumbers('records-PV7000009.csv')).toBe('records-[student number].csv');
    expect(withholdStudentNumbers("'hr1000037' is not a course code")).toBe(
      "'[student number]' is not a course code",
    );
    expect(withholdStudentNumbers('20231234;CMP 2310;2025-SP')).toBe(
      '[student number];CMP 2310;2025-SP',
    );
    for (const kept of ['CMP 2310', 'CMP2310', '2025-SP', 'grades-2025.csv', 'B+', '3.5']) {
      expect(withholdStudentNumbers(kept)).toBe(kept);
    }
    expect(looksLikeStudentNumber(' PV7000004 ')).toBe(true);
    expect(looksLikeStudentNumber('PV7000004 and more')).toBe(false);
  });

  it('follows the configured pattern (KINPATH_STUDENT_NUMBER_PATTERN)', () => {
    expect(withholdStudentNumbers('file S-123 and PV7000004', 'S-[0-9]{3}')).toBe(
      'file [student number] and PV7000004',
    );
  });
});
