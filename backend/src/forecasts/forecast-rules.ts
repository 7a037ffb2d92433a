import type { ForecastFlag } from '@kinpath/contracts';

/**
 * The outlook's rules that need no database: flags, utilisation, CSV cells safe for
 * spreadsheets, and the plain sentence on what drives demand.
 */

/**
 * Over-subscribed when even the interval's low end is above the seats; an elective with no
 * history is never at risk for that reason alone, so it is flagged no history; at risk when
 * the expected enrolment is below the head's threshold; otherwise balanced.
 */
export function forecastFlag(
  expected: number,
  low: number,
  capacity: number,
  atRiskBelow: number,
  noHistory = false,
): ForecastFlag {
  if (low > capacity) return 'over_subscribed';
  if (noHistory) return 'no_history';
  if (expected < atRiskBelow) return 'at_risk';
  return 'balanced';
}

/** Expected enrolment as a share of the seats (0.8 = 80 %); null when there are none. */
export function utilisation(expected: number, capacity: number): number | null {
  return capacity > 0 ? expected / capacity : null;
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

/** What each rate feature of the choice model stands for, in method.md's θ order. */
const DRIVERS = [
  'how many students have taken the elective before',
  'programme',
  'stage (terms studied so far)',
  'programme and stage together',
  'year of study against the course level',
];

/**
 * One plain sentence on what moves students' choices: the rate features ranked by their
 * influence (|θ| times the spread of the feature), and how binding prerequisites are
 * (θ6: exp(θ6) is the odds of choosing an elective whose prerequisites are missing).
 */
export function driversSentence(theta: ArrayLike<number>, influence: ArrayLike<number>): string {
  const ranked = DRIVERS.map((name, j) => ({ name, weight: influence[j] ?? 0 }))
    .filter((d) => d.weight > 0)
    .sort((a, b) => b.weight - a.weight);
  const top = ranked.slice(0, 2).map((d) => d.name);
  const first = top.length
    ? `${top.join(' and ')} matter${top.length === 1 ? 's' : ''} most`
    : 'no single factor stands out';
  const u = theta[5];
  const prerequisites =
    u === undefined
      ? ''
      : u <= -3
        ? '; prerequisites are rarely waived'
        : u <= -1
          ? '; prerequisites are sometimes waived'
          : '; prerequisites are often waived';
  const sentence = `${first}${prerequisites}.`;
  return sentence[0].toUpperCase() + sentence.slice(1);
}
