import { describe, expect, it } from 'vitest';
import { parsePrerequisites } from './prerequisites';

describe('prerequisite expressions', () => {
  it('reads an empty cell as no prerequisites', () => {
    expect(parsePrerequisites('  ')).toEqual({
      ok: true,
      expression: null,
      normalized: '',
      courses: [],
    });
  });

  it('parses AND / OR with parentheses, AND binding tighter, into normal form', () => {
    const parsed = parsePrerequisites('cmp1100 and (MTH 1200 or mth1210)');
    expect(parsed).toMatchObject({
      ok: true,
      normalized: 'CMP 1100 AND (MTH 1200 OR MTH 1210)',
      courses: ['CMP 1100', 'MTH 1200', 'MTH 1210'],
    });
    expect(
      parsePrerequisites('A 1 OR CMP 1100 AND MTH 1200'.replace('A 1 OR ', 'BIO 1010 OR ')),
    ).toMatchObject({
      ok: true,
      expression: {
        type: 'or',
        items: [
          { type: 'course', code: 'BIO 1010' },
          { type: 'and', items: [{ code: 'CMP 1100' }, { code: 'MTH 1200' }] },
        ],
      },
    });
  });

  it('keeps needed parentheses and drops redundant ones', () => {
    expect(
      parsePrerequisites('((CMP 1100))').ok && parsePrerequisites('((CMP 1100))'),
    ).toMatchObject({
      normalized: 'CMP 1100',
    });
    expect(parsePrerequisites('(CMP 1100 OR CMP 1200) AND MTH 1200')).toMatchObject({
      normalized: '(CMP 1100 OR CMP 1200) AND MTH 1200',
    });
  });

  it.each([
    ['CMP 1100 AND', "a course code or '(' was expected, not the end"],
    ['(CMP 1100 OR MTH 1200', "a ')' is missing before the end"],
    ['CMP 1100 MTH 1200', "'MTH 1200' was not expected after a complete expression"],
    ['CMP 1100 XOR MTH 1200', "'XOR' is neither a course code nor AND / OR"],
    ['CMP 1100 & MTH 1200', "'&' is neither a course code nor AND / OR"],
    ['OR CMP 1100', "a course code or '(' was expected, not 'OR'"],
  ])('refuses %s with a plain reason', (input, error) => {
    expect(parsePrerequisites(input)).toEqual({ ok: false, error });
  });
});
