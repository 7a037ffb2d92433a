import { DEFAULT_GRADE_SCALE } from '@kinpath/contracts';
import { describe, expect, it } from 'vitest';
import { DemoDataError, parseCsv, readCatalogue, readRecords, readStudents } from './demo-csv';

const fakePseudonym = (id: string) => `p(${id})`;

describe('demo CSV reading', () => {
  it('reads a byte-order mark, semicolons and quoted fields', () => {
    const rows = parseCsv(
      '\uFEFFcourse_code;title;department;elective\r\ncmp2310;"Data; Structures";CMP;no\r\n',
    );
    expect(readCatalogue(rows)).toEqual([
      {
        courseCode: 'CMP 2310',
        title: 'Data; Structures',
        department: 'CMP',
        credits: null,
        level: null,
        elective: false,
        prerequisites: '',
        description: null,
      },
    ]);
  });

  it('pseudonymises student numbers and defaults the status to active', () => {
    const rows = parseCsv(
      'student_id,program,entry_term,status\nHR0000009,BSc Computing,2024-FA,\n',
    );
    expect(readStudents(rows, fakePseudonym)).toEqual([
      {
        pseudonym: 'p(HR0000009)',
        program: 'BSc Computing',
        entryTerm: '2024-FA',
        status: 'active',
      },
    ]);
  });

  it('maps grades to points and keeps marks without points', () => {
    const rows = parseCsv(
      'student_id,term,course_code,grade,satisfaction,credits_attempted\n' +
        'HR0000009,2025-FA,CMP 2310,b+,4,3\n' +
        'HR0000009,2025-WI,CMP 1100,W,,3\n' +
        'HR0000009,2024-FA,MTH 1200,3.5,,\n',
    );
    const records = readRecords(rows, fakePseudonym, DEFAULT_GRADE_SCALE);
    expect(records.map((r) => [r.grade, r.gradePoints, r.satisfaction])).toEqual([
      ['B+', 3.3, 4],
      ['W', null, null],
      ['3.5', 3.5, null],
    ]);
  });

  it('names file, line and column of a bad cell without repeating the student number', () => {
    const rows = parseCsv(
      'student_id,term,course_code,grade\nHR0000009,2025-FA,CMP 2310,A\nHR0000010,2025-FA,CMP 2310,Q\n',
    );
    const read = () => readRecords(rows, fakePseudonym, DEFAULT_GRADE_SCALE);
    expect(read).toThrow(DemoDataError);
    expect(read).toThrow("records.csv, line 3, grade: 'Q' is not on the grade scale.");
    try {
      read();
    } catch (error) {
      expect((error as Error).message).not.toContain('HR0000010');
    }
  });
});
