import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

// The compiled command line (run `npm run build` first), as a user would call it.
const CLI = join(__dirname, '..', 'dist', 'cli.js');
const dir = mkdtempSync(join(tmpdir(), 'kinpath-engine-cli-'));
const file = (name: string, text: string): string => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};
const run = (...args: string[]) => {
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8' });
  return {
    code: r.status,
    out: r.stdout,
    err: r.stderr,
    lines: r.stdout
      .trim()
      .split('\n')
      .filter(Boolean)
      .map((l) => JSON.parse(l)),
  };
};

// Aggarwal (2016), Table 2.1 (quoted from memory), as a records file with a satisfaction column.
const M = [
  [7, 6, 7, 4, 5, 4],
  [6, 7, null, 4, 3, 4],
  [null, 3, 3, 1, 1, null],
  [1, 2, 2, 3, 3, 4],
  [1, null, 1, 2, 3, 3],
];
const rows = ['student,course,term,grade,satisfaction'];
M.forEach((r, u) =>
  r.forEach((v, j) => v !== null && rows.push(`user${u + 1},item${j + 1},2016-FA,${v},`)),
);
const records = file('records.csv', rows.join('\n') + '\n');
// The original method (--center on), which the textbook example follows.
const pearsonOriginal = ['--center', 'on', '--similarity', 'pearson', '--iuf', 'off'];
const textbook = [...pearsonOriginal, '--k', '2', '--min-neighbours', '2'];

describe('kinpath-engine command line', () => {
  it('predict: JSON Lines in the order the courses were given', () => {
    const r = run(
      'predict',
      '--records',
      records,
      '--student',
      'user3',
      '--course',
      'item6',
      '--course',
      'item1',
      ...textbook,
    );
    expect(r.code).toBe(0);
    expect(r.lines).toHaveLength(1);
    const [p6, p1] = r.lines[0].predictions;
    expect(r.lines[0].student).toBe('user3');
    expect(p6).toMatchObject({ course: 'item6', neighbours: 2, basis: 'neighbours' });
    expect(p6.value).toBeCloseTo(0.86, 2);
    expect(p1.value).toBeCloseTo(3.35, 2);
  });

  it('predict without courses: every course the student has no value for; clamps only with --scale', () => {
    const students = file('students.txt', 'user3\nuser1\n');
    const r = run('predict', '--records', records, '--students-file', students, ...textbook);
    expect(r.lines.map((l) => l.student)).toEqual(['user3', 'user1']);
    expect(r.lines[0].predictions.map((p: { course: string }) => p.course)).toEqual([
      'item1',
      'item6',
    ]);
    expect(r.lines[1].predictions).toEqual([]);
    const clamped = run(
      'predict',
      '--records',
      records,
      '--student',
      'user3',
      '--course',
      'item6',
      '--scale',
      '1:7',
      ...textbook,
    );
    expect(clamped.lines[0].predictions[0].value).toBe(1);
  });

  it('neighbours: most similar first, only above min-similarity, with overlap', () => {
    const r = run('neighbours', '--records', records, '--student', 'user3', ...pearsonOriginal);
    expect(r.code).toBe(0);
    expect(r.lines[0].neighbours.map((n: { student: string }) => n.student)).toEqual([
      'user2',
      'user1',
    ]);
    expect(r.lines[0].neighbours[0].overlap).toBe(3);
    const all = run(
      'neighbours',
      '--records',
      records,
      '--student',
      'user3',
      ...pearsonOriginal,
      '--min-similarity=-2',
      '--limit',
      '3',
    );
    expect(all.lines[0].neighbours).toHaveLength(3);
  });

  it('evaluate: one object with configurations and baselines', () => {
    const r = run('evaluate', '--records', records, '--folds', '3', '--seed', '4');
    expect(r.code).toBe(0);
    expect(r.lines).toHaveLength(1);
    expect(r.lines[0].baselines.globalMean.n).toBe(26);
    expect(Object.keys(r.lines[0].baselines)).toEqual([
      'globalMean',
      'courseMean',
      'studentMean',
      'dampedBias',
    ]);
  });

  const bad: [string, string[], RegExp][] = [
    [
      'an unknown option',
      ['predict', '--records', records, '--student', 'user3', '--bogus'],
      /Unknown option/,
    ],
    ['an unknown command', ['guess', '--records', records], /unknown command/],
    [
      'a missing file',
      ['predict', '--records', join(dir, 'none.csv'), '--student', 'a'],
      /cannot read/,
    ],
    [
      'a wrong header',
      ['predict', '--records', file('h.csv', 'id,course,term,grade\na,b,c,1\n'), '--student', 'a'],
      /:1: header/,
    ],
    [
      'a grade that is not a number',
      [
        'predict',
        '--records',
        file('g.csv', 'student,course,term,grade\na,b,c,A-\n'),
        '--student',
        'a',
      ],
      /:2: grade "A-"/,
    ],
    [
      'a short row',
      [
        'predict',
        '--records',
        file('s.csv', 'student,course,term,grade\na,b,c,1\na,b\n'),
        '--student',
        'a',
      ],
      /:3: expected 4 fields/,
    ],
    [
      'an empty key',
      [
        'predict',
        '--records',
        file('e.csv', 'student,course,term,grade\n,b,c,1\n'),
        '--student',
        'a',
      ],
      /:2: .*empty student key/,
    ],
    [
      'a value outside --scale',
      ['predict', '--records', records, '--student', 'user3', '--scale', '0:4'],
      /:2: .*outside the scale/,
    ],
    ['a bad --k', ['predict', '--records', records, '--student', 'user3', '--k', 'many'], /--k/],
    ['evaluate without a plan', ['evaluate', '--records', records], /exactly one/],
    [
      'an option of another command',
      ['neighbours', '--records', records, '--student', 'a', '--folds', '2'],
      /does not apply/,
    ],
  ];
  for (const [what, args, message] of bad) {
    it(`exit code 2 and one line on stderr for ${what}`, () => {
      const r = run(...args);
      expect(r.code).toBe(2);
      expect(r.out).toBe('');
      expect(r.err.trim().split('\n')).toHaveLength(1);
      expect(r.err).toMatch(message);
    });
  }
});
