/**
 * The figures and dates of every screen, formatted one way: estimates by the rule the summary
 * e-mail uses too (from the contracts), dates and times in the ISO form.
 */
export { gradePointsText, satisfactionText } from '@kinpath/contracts';

const pad = (n: number) => String(n).padStart(2, '0');

/** `YYYY-MM-DD HH:MM` in the reader's own clock: unambiguous, and it sorts as it reads. */
export function dateTime(value: string | null | undefined): string {
  if (!value) return '—';
  const date = new Date(value);
  if (Number.isNaN(date.getTime())) return value;
  return `${isoDate(value)} ${pad(date.getHours())}:${pad(date.getMinutes())}`;
}

/** `YYYY-MM-DD` in the reader's own clock. */
export function isoDate(value: string | null | undefined): string {
  if (!value) return '—';
  const date = new Date(value);
  if (Number.isNaN(date.getTime())) return value;
  return `${date.getFullYear()}-${pad(date.getMonth() + 1)}-${pad(date.getDate())}`;
}
