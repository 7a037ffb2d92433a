/** Metrics with fixed decimals, as the office's tables print them. */
export const fixed = (value: number | null, digits = 3) =>
  value === null ? '—' : value.toFixed(digits);

export const percent = (value: number | null) =>
  value === null ? '—' : `${(value * 100).toFixed(1)} %`;

export const count = (value: number) => value.toLocaleString('en-GB');

export function formatWhen(iso: string): string {
  return new Date(iso).toLocaleString('en-GB', {
    year: 'numeric',
    month: 'short',
    day: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
  });
}
