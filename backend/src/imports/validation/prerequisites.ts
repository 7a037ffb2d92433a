import { normalizeCourseCode } from '@kinpath/contracts';

/**
 * Prerequisite expressions (data.md): course codes joined by AND / OR with
 * parentheses, e.g. `CMP 1100 AND (MTH 1200 OR MTH 1210)`. AND binds tighter
 * than OR, as in most query languages.
 */
export type PrerequisiteNode =
  { type: 'course'; code: string } | { type: 'and' | 'or'; items: PrerequisiteNode[] };

export type PrerequisiteParse =
  | { ok: true; expression: PrerequisiteNode | null; normalized: string; courses: string[] }
  | { ok: false; error: string };

type Token = { kind: 'code' | 'and' | 'or' | 'open' | 'close'; text: string; at: number };

const TOKEN = /\s*(?:(\()|(\))|([A-Za-z]{2,6} ?\d{3,5})(?![A-Za-z0-9])|([A-Za-z]+)|(\S+))/y;

function tokenize(input: string): Token[] | string {
  const tokens: Token[] = [];
  TOKEN.lastIndex = 0;
  while (TOKEN.lastIndex < input.length) {
    const at = TOKEN.lastIndex;
    const match = TOKEN.exec(input);
    if (!match) break;
    const position = match.index + match[0].length - match[0].trimStart().length;
    if (match[1]) tokens.push({ kind: 'open', text: '(', at: position });
    else if (match[2]) tokens.push({ kind: 'close', text: ')', at: position });
    else if (match[3]) {
      tokens.push({ kind: 'code', text: normalizeCourseCode(match[3]) as string, at: position });
    } else if (match[4]) {
      const word = match[4].toUpperCase();
      if (word !== 'AND' && word !== 'OR') {
        return `'${match[4]}' is neither a course code nor AND / OR`;
      }
      tokens.push({ kind: word === 'AND' ? 'and' : 'or', text: word, at: position });
    } else if (match[5]) {
      return `'${match[5]}' is neither a course code nor AND / OR`;
    }
    if (TOKEN.lastIndex === at) break;
  }
  return tokens;
}

/** Parses an expression; an empty cell means no prerequisites. */
export function parsePrerequisites(input: string): PrerequisiteParse {
  const text = input.trim();
  if (text === '') return { ok: true, expression: null, normalized: '', courses: [] };
  const tokenized = tokenize(text);
  if (typeof tokenized === 'string') return { ok: false, error: tokenized };
  const tokens: Token[] = tokenized;
  let index = 0;
  const courses: string[] = [];

  const describe = (token: Token | undefined) => (token ? `'${token.text}'` : 'the end');

  function parseOr(): PrerequisiteNode {
    const items = [parseAnd()];
    while (tokens[index]?.kind === 'or') {
      index++;
      items.push(parseAnd());
    }
    return items.length === 1 ? items[0] : { type: 'or', items };
  }

  function parseAnd(): PrerequisiteNode {
    const items = [parseFactor()];
    while (tokens[index]?.kind === 'and') {
      index++;
      items.push(parseFactor());
    }
    return items.length === 1 ? items[0] : { type: 'and', items };
  }

  function parseFactor(): PrerequisiteNode {
    const token = tokens[index];
    if (token?.kind === 'code') {
      index++;
      courses.push(token.text);
      return { type: 'course', code: token.text };
    }
    if (token?.kind === 'open') {
      index++;
      const inner = parseOr();
      if (tokens[index]?.kind !== 'close') {
        throw new Error(`a ')' is missing before ${describe(tokens[index])}`);
      }
      index++;
      return inner;
    }
    throw new Error(`a course code or '(' was expected, not ${describe(token)}`);
  }

  try {
    const expression = parseOr();
    if (index < tokens.length) {
      throw new Error(`${describe(tokens[index])} was not expected after a complete expression`);
    }
    return {
      ok: true,
      expression,
      normalized: formatPrerequisites(expression),
      courses: [...new Set(courses)],
    };
  } catch (error) {
    return { ok: false, error: (error as Error).message };
  }
}

/** The stored form: normal course codes, upper-case AND / OR, parentheses only where needed. */
export function formatPrerequisites(node: PrerequisiteNode | null, parent?: 'and' | 'or'): string {
  if (!node) return '';
  if (node.type === 'course') return node.code;
  const inner = node.items
    .map((item) => formatPrerequisites(item, node.type))
    .join(node.type === 'and' ? ' AND ' : ' OR ');
  return parent === 'and' && node.type === 'or' ? `(${inner})` : inner;
}
