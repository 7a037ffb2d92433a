import type { ForecastFlag } from '@kinpath/contracts';
import { termOrdinal } from '@kinpath/contracts';
import { createHash } from 'node:crypto';

/**
 * The outlook's rules that need no database: year of study, flags, the stored student key,
 * CSV cells safe for spreadsheets, and the sentence that says how beta was chosen.
 */

/** Year of study in a term for a student who entered in `entryTerm` (four terms a year). */
export function yearOfStudy(entryTerm: string | null, term: string): number | null {
  if (!entryTerm) return null;
  const terms = termOrdinal(term) - termOrdinal(entryTerm);
  return terms < 0 ? null : Math.floor(terms / 4) + 1;
}

/**
 * Over-subscribed when even the interval's low end is above the seats; at risk when the expected
 * enrolment is below the head's threshold; otherwise balanced. Over-subscription wins.
 */
export function forecastFlag(
  expected: number,
  low: number,
  capacity: number,
  atRiskBelow: number,
): ForecastFlag {
  if (low > capacity) return 'over_subscribed';
  if (expected < atRiskBelow) return 'at_risk';
  return 'balanced';
}

export function utilisation(expected: number, capacity: number): number | null {
  return capacity > 0 ? expected / capacity : null;
}

/**
 * The key a scored row is stored under: derived from the pseudonym (itself an HMAC of the
 * student number), so the results table never joins straight back to the records.
 */
export function studentKey(pseudonym: string): string {
  return createHash('sha256').update(`kinpath-outlook:${pseudonym}`).digest('hex').slice(0, 32);
}

/**
 * A CSV cell a spreadsheet will not run: text beginning with =, +, -, @ (or a tab or carriage
 * return, which some spreadsheets strip before looking) gets a leading apostrophe.
 */
export function neutraliseCell(value: string): string {
  return /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
}

function quoteCell(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

/** RFC 4180 CSV with every cell neutralised; numbers and nulls are written by the caller. */
export function toCsv(header: readonly string[], rows: readonly (readonly string[])[]): string {
  const line = (cells: readonly string[]) =>
    cells.map((c) => quoteCell(neutraliseCell(c))).join(',');
  return [header, ...rows].map(line).join('\r\n') + '\r\n';
}

export function betaSentence(
  beta: number,
  calibrationTerm: string | null,
  sameTerm = false,
): string {
  const b = beta.toFixed(3);
  if (!calibrationTerm) {
    return `No completed term with enrolments to calibrate on, so beta is set to ${b}; fit then weighs little in the choice.`;
  }
  return (
    `Beta (${b}), how strongly a better fit pulls a student towards an elective, was chosen from a grid of values as the one whose forecast for ${calibrationTerm}, made from the records before it, came closest to the real enrolments (lowest WAPE)` +
    (sameTerm ? '; it was chosen on this same term, which flatters the backtest a little.' : '.')
  );
}
