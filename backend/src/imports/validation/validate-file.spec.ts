import { sortTerms, type ImportKind, type ImportMapping } from '@kinpath/contracts';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { DEFAULT_SCALE_MODEL } from '../../grade-scale/grade-scale.model';
import { pseudonymFor } from '../../pseudonym/pseudonym';
import { detectDelimiter, reportCell } from './csv-format';
import { WITHHELD_STUDENT_ID } from './row-rules';
import { validateFile } from './validate-file';

const dir = mkdtempSync(join(tmpdir(), 'kinpath-validate-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const KEY = 'halden-unit-test-key';
let n = 0;

async function run(
  kind: ImportKind,
  content: string | Buffer,
  options: { mapping?: ImportMapping; known?: string[] } = {},
) {
  const path = join(dir, `in-${++n}.csv`);
  const acceptedPath = join(dir, `out-${n}.csv`);
  writeFileSync(path, content);
  const result = await validateFile({
    path,
    kind,
    mapping: options.mapping,
    acceptedPath,
    context: {
      knownCourses: new Set(options.known ?? ['CMP 1100', 'CMP 2310', 'MTH 1200']),
      scale: DEFAULT_SCALE_MODEL,
      pseudonymFor: (id) => pseudonymFor(KEY, id),
    },
  });
  const accepted = readFileSync(acceptedPath, 'utf8');
  return {
    ...result,
    accepted,
    messages: result.rejections.map((r) => `line ${r.line}, ${r.column}: ${r.reason}`),
  };
}

const RECORDS = 'student_id,term,course_code,grade,satisfaction,credits_attempted\n';

describe('records rules', () => {
  it('accepts a clean row, pseudonymises the student and normalises code and term', async () => {
    const result = await run('records', `${RECORDS}HR0000001,2024-fa,cmp2310,b+,4,3\n`);
    expect(result.rejections).toEqual([]);
    expect(result.rowsAccepted).toBe(1);
    expect(result.accepted).toBe(`${pseudonymFor(KEY, 'HR0000001')},2024-FA,CMP 2310,B+,4,3\n`);
    expect(result.accepted).not.toContain('HR0000001');
  });

  it('rejects every rule with the line and column of the file', async () => {
    const rows = [
      'HR0000001,2024-FA,CMP 2310,Q,4,3', // line 2: grade
      'HR0000002,2024-FALL,CMP 2310,A,4,3', // line 3: term
      'HR0000003,2024-FA,CMP-2310,A,4,3', // line 4: course form
      'HR0000004,2024-FA,BIO 9990,A,4,3', // line 5: unknown course
      'HR0000005,2024-FA,CMP 2310,A,6,3', // line 6: satisfaction
      ',2024-FA,CMP 2310,A,4,3', // line 7: student id required
      'HR0000001,2024-FA,CMP 2310,A,,3', // line 8: duplicate of line 2? line 2 was rejected but the key counts
      'HR0000009,2024-FA,CMP 2310,,2,3', // line 9: grade required
      'HR0000010,2024-FA,CMP 2310,A,2,x', // line 10: credits
      'HR0000011,2024-FA,CMP 2310', // line 11: ragged
      'HR0000012,2024-FA,MTH 1200,3.3,,', // line 12: fine (points)
    ];
    const result = await run('records', RECORDS + rows.join('\n') + '\n');
    expect(result.messages).toEqual([
      "line 2, grade: 'Q' is not on the grade scale (A … F) nor a mark (W, I, IP, AU, P, NP), nor grade points from 0 to 4",
      "line 3, term: '2024-FALL' is not a term of the form YYYY-XX (XX one of WI, SP, SU, FA)",
      "line 4, course_code: 'CMP-2310' is not a course code (letters then digits, e.g. CMP 2310)",
      "line 5, course_code: course 'BIO 9990' is not in the catalogue",
      "line 6, satisfaction: '6' is not a whole number from 1 to 5",
      'line 7, student_id: is required',
      'line 8, course_code: the same student, term and course come twice: also on line 2',
      'line 9, grade: is required',
      "line 10, credits_attempted: 'x' is not a number from 0 to 999.99",
      'line 11, : the row has 3 fields where the header has 6',
    ]);
    expect(result.rowsTotal).toBe(11);
    expect(result.rowsAccepted).toBe(1);
    expect(result.rowsRejected).toBe(10);
    expect(result.accepted.split('\n')[0]).toContain(',MTH 1200,3.3,,');
  });

  it('never reports a raw student number', async () => {
    const result = await run(
      'records',
      `${RECORDS}HR 0000001,2024-FA,CMP 2310,A,,\nHR0000002,2024-FA,CMP 2310,A,,\nhr0000002,2024-FA,CMP 2310,B,,\n`,
    );
    const student = result.rejections.filter((r) => r.column === 'student_id');
    expect(student.map((r) => r.value)).toEqual([WITHHELD_STUDENT_ID]);
    expect(JSON.stringify(result.rejections)).not.toMatch(/HR ?000000/i);
    expect(result.messages).toContain(
      'line 4, course_code: the same student, term and course come twice: also on line 3',
    );
  });
});

describe('file forms', () => {
  it('reads UTF-8 with a byte-order mark', async () => {
    const bom = Buffer.concat([
      Buffer.from([0xef, 0xbb, 0xbf]),
      Buffer.from(`${RECORDS}HR0000001,2024-FA,CMP 2310,A,5,3\n`),
    ]);
    const result = await run('records', bom);
    expect(result.headers[0]).toBe('student_id');
    expect(result.rowsAccepted).toBe(1);
  });

  it('detects semicolons from the header line and reads them', async () => {
    expect(detectDelimiter('a;b;"c,d"')).toBe(';');
    expect(detectDelimiter('a,b;c,d')).toBe(',');
    const result = await run(
      'records',
      'student_id;term;course_code;grade;satisfaction;credits_attempted\nHR0000001;2024-FA;CMP 2310;A;5;3,5\n',
    );
    expect(result.delimiter).toBe(';');
    expect(result.messages).toEqual([
      "line 2, credits_attempted: '3,5' is not a number from 0 to 999.99",
    ]);
  });

  it('reads quoted fields with delimiters, quotes and line breaks, and CRLF endings', async () => {
    const content =
      'course_code,title,department,credits,level,elective,prerequisites,description\r\n' +
      'CMP 3100,"Systems, Networks and ""Clouds""",CMP,3,3000,yes,CMP 2310,"Two\r\nlines"\r\n' +
      'CMP 3200,Compilers,CMP,3,3000,no,,\r\n' +
      'CMP 3300,Bad,CMP,x,3000,maybe,,\r\n';
    const result = await run('catalogue', content);
    expect(result.messages).toEqual([
      "line 6, credits: 'x' is not a number from 0 to 999.99",
      "line 6, elective: 'maybe' is not yes or no",
    ]);
    expect(result.accepted).toBe(
      'CMP 3100,"Systems, Networks and ""Clouds""",CMP,3,3000,true,CMP 2310,"Two\r\nlines"\n' +
        'CMP 3200,Compilers,CMP,3,3000,false,"",\n',
    );
  });

  it('takes a mapping of other headers to the fields', async () => {
    const content =
      'Student No;Semester;Course;Final Grade;Extra\nHR0000001;2024-SP;CMP 1100;C-;ignored\n';
    const mapping = {
      'Student No': 'student_id',
      Semester: 'term',
      Course: 'course_code',
      'Final Grade': 'grade',
    };
    const result = await run('records', content, { mapping });
    expect(result.fatal).toBeNull();
    expect(result.rowsAccepted).toBe(1);
    const unmapped = await run('records', content);
    expect(unmapped.fatal).toMatch(
      /required columns student_id, term, course_code, grade are missing/,
    );
    expect(unmapped.rejections[0]).toMatchObject({ line: 1 });
  });

  it('reports a broken quote without echoing the cell', async () => {
    const result = await run(
      'records',
      `${RECORDS}HR0000001,2024-FA,CMP 2310,A,5,3\n"HR0000002,2024-FA,CMP 2310,A,5,3\n`,
    );
    expect(result.rowsAccepted).toBe(1);
    expect(JSON.stringify(result.rejections)).not.toContain('HR0000002');
    expect(result.rejections[0].reason).toMatch(/quoted field is not closed/);
  });
});

describe('other kinds', () => {
  it('catalogue: prerequisites must parse and name known courses, also later rows', async () => {
    const content =
      'course_code,title,department,prerequisites\n' +
      'CMP 4100,Advanced,CMP,CMP 4200 AND (MTH 1200 OR cmp1100)\n' +
      'CMP 4200,Later row,CMP,\n' +
      'CMP 4300,Unknown,CMP,PHY 9000 OR BIO 9000\n' +
      'CMP 4400,Broken,CMP,CMP 1100 AND\n' +
      'CMP 4500,Self,CMP,CMP 4500\n' +
      'CMP 4200,Again,C1,\n';
    const result = await run('catalogue', content);
    expect(result.messages).toEqual([
      "line 4, prerequisites: 'PHY 9000', 'BIO 9000' are not in the catalogue",
      "line 5, prerequisites: 'CMP 1100 AND' does not parse: a course code or '(' was expected, not the end",
      "line 6, prerequisites: course 'CMP 4500' cannot be its own prerequisite",
      "line 7, department: 'C1' is not a department code (2 to 6 letters)",
      "line 7, course_code: 'CMP 4200' comes twice: also on line 3",
    ]);
    expect(result.accepted).toContain('CMP 4200 AND (MTH 1200 OR CMP 1100)');
  });

  it('offerings: term, known course, whole numbers, duplicates', async () => {
    const content =
      'term,course_code,sections,capacity\n2025-SP,CMP 2310,2,60\n2025-SP,cmp 2310,1,30\n2025-XX,CMP 2310,1,\n2025-FA,PHY 1000,1.5,-3\n';
    const result = await run('offerings', content);
    expect(result.messages).toEqual([
      'line 3, course_code: 2025-SP CMP 2310 comes twice: also on line 2',
      "line 4, term: '2025-XX' is not a term of the form YYYY-XX (XX one of WI, SP, SU, FA)",
      'line 4, capacity: is required',
      "line 5, course_code: course 'PHY 1000' is not in the catalogue",
      "line 5, sections: '1.5' is not a whole number of 0 or more",
      "line 5, capacity: '-3' is not a whole number of 0 or more",
    ]);
  });

  it('students: status values, entry term, duplicates', async () => {
    const content =
      'student_id,program,entry_term,status\nHR1,Computing BSc,2021-FA,\nHR2,,2021-FA,On Leave\nHR3,,2021,expelled\nhr1,,,graduated\n';
    const result = await run('students', content);
    expect(result.messages).toEqual([
      "line 4, entry_term: '2021' is not a term of the form YYYY-XX (XX one of WI, SP, SU, FA)",
      "line 4, status: 'expelled' is not one of active, graduated, withdrawn, on_leave",
      'line 5, student_id: the same student comes twice: also on line 2',
    ]);
    expect(result.accepted).toBe(
      `${pseudonymFor(KEY, 'HR1')},Computing BSc,2021-FA,active\n${pseudonymFor(KEY, 'HR2')},,2021-FA,on_leave\n`,
    );
  });
});

describe('terms and reports', () => {
  it('orders terms WI < SP < SU < FA within a year', () => {
    expect(sortTerms(['2025-FA', '2025-SP', '2024-FA', '2025-WI', '2025-SU'])).toEqual([
      '2024-FA',
      '2025-WI',
      '2025-SP',
      '2025-SU',
      '2025-FA',
    ]);
  });

  it('neutralises formula cells in the CSV report', () => {
    expect(reportCell('=SUM(A1)')).toBe("'=SUM(A1)");
    expect(reportCell('+1')).toBe("'+1");
    expect(reportCell('-2')).toBe("'-2");
    expect(reportCell('@x')).toBe("'@x");
    expect(reportCell('a,"b"')).toBe('"a,""b"""');
  });
});

describe('privacy of rejections', () => {
  it('stores a student number rejected from another column as the mark, in value and reason', async () => {
    const result = await run('records', `${RECORDS}HR0000001,2024-FA,PV7000004,A,4,3\n`);
    expect(result.rejections).toEqual([
      {
        line: 2,
        column: 'course_code',
        value: '[student number]',
        reason: "'[student number]' is not a course code (letters then digits, e.g. CMP 2310)",
      },
    ]);
    expect(JSON.stringify(result.rejections)).not.toMatch(/PV7000004|HR0000001/);
  });

  it('never quotes the cells of a file without a header row', async () => {
    const result = await run(
      'records',
      'PV7000004,2025-SP,CMP 2310,A,4,3\nPV7000005,2025-SP,CMP 2310,B,4,3\n',
    );
    expect(result.fatal).toMatch(/the first line holds data, not column names/);
    expect(JSON.stringify([result.fatal, result.rejections])).not.toMatch(
      /PV700000|CMP 2310|2025-SP/,
    );
  });

  it('follows the institution pattern given in the context', async () => {
    const path = join(dir, 'pattern.csv');
    writeFileSync(path, `${RECORDS}S-12,2024-FA,S-99,A,4,3\n`);
    const result = await validateFile({
      path,
      kind: 'records',
      acceptedPath: join(dir, 'pattern-out.csv'),
      context: {
        knownCourses: new Set(['CMP 2310']),
        scale: DEFAULT_SCALE_MODEL,
        pseudonymFor: (id) => pseudonymFor(KEY, id),
        studentNumber: 'S-[0-9]+',
      },
    });
    expect(result.rejections[0]).toMatchObject({
      column: 'course_code',
      value: '[student number]',
    });
  });
});

describe('text limits and control characters', () => {
  const CATALOGUE =
    'course_code,title,department,credits,level,elective,prerequisites,description\n';

  it('refuses text longer than its field holds, naming the limit, without storing the text', async () => {
    const rows = [
      `CMP 1100,${'T'.repeat(201)},CMP,3,1000,no,,`,
      `CMP 1101,Fine,CMP,3,1000,no,,${'d'.repeat(4001)}`,
      `CMP 1102,${'T'.repeat(200)},CMP,3,1000,no,,${'d'.repeat(4000)}`,
    ];
    const result = await run('catalogue', CATALOGUE + rows.join('\n') + '\n');
    expect(result.messages).toEqual([
      'line 2, title: is 201 characters long; title holds at most 200',
      'line 3, description: is 4,001 characters long; description holds at most 4,000',
    ]);
    expect(result.rowsAccepted).toBe(1);
    expect(result.rejections.every((r) => r.value.length <= 201)).toBe(true);
  });

  it('limits programme names to 100 characters', async () => {
    const result = await run(
      'students',
      `student_id,program,entry_term,status\nHR0000001,${'P'.repeat(101)},2024-FA,active\n`,
    );
    expect(result.messages).toEqual([
      'line 2, program: is 101 characters long; program holds at most 100',
    ]);
  });

  it('refuses NUL and other control characters with line and column, and a tab outside quotes', async () => {
    const rows = [
      'CMP 1100,Bad\u0000Title,CMP,3,1000,no,,',
      'CMP 1101,Bell\u0007,CMP,3,1000,no,,',
      'CMP 1102,Tab\there,CMP,3,1000,no,,',
      'CMP 1103,"Quoted\ttab",CMP,3,1000,no,,',
    ];
    const result = await run('catalogue', CATALOGUE + rows.join('\n') + '\n');
    expect(result.messages).toEqual([
      'line 2, title: holds a control character (NUL) at position 4; remove it',
      'line 3, title: holds a control character (U+0007) at position 5; remove it',
      'line 4, title: holds a tab outside quotes; put the cell in double quotes or remove the tab',
    ]);
    expect(result.rowsAccepted).toBe(1);
    expect(result.accepted).toContain('Quoted\ttab');
  });
});
