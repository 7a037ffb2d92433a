/** Metrics with fixed decimals, as the office's tables print them. */
export const fixed = (value: number | null, digits = 3) =>
  value === null ? '—' : value.toFixed(digits);

export const percent = (value: number | null) =>
  value === null ? '—' : `${(value * 100).toFixed(1)} %`;

export const count = (value: number) => value.toLocaleString('en-GB');

/** One date form for every screen: `YYYY-MM-DD HH:MM`. */
export { dateTime as formatWhen } from '../../lib/format';
