import type { EstimateBasis, EstimateConfidence, StudentStatus } from '@kinpath/contracts';

/** Fixed decimals so figures line up in columns; a dash stands for no value. */
export function fixed(value: number | null | undefined, decimals: number): string {
  return value === null || value === undefined || Number.isNaN(value)
    ? '—'
    : value.toFixed(decimals);
}

export const BASIS_LABELS: Record<EstimateBasis, string> = {
  neighbours: 'kin',
  baseline: 'baseline — too few kin',
  none: 'none — no estimate',
};

/** What each basis means, for tooltips and screen readers. */
export const BASIS_DESCRIPTIONS: Record<EstimateBasis, string> = {
  neighbours: 'Estimated from the results of similar past students (kin).',
  baseline:
    'Too few kin took this course: estimated from the course’s and the student’s averages instead.',
  none: 'No past results in this course: no estimate.',
};

export const CONFIDENCE_LABELS: Record<EstimateConfidence, string> = {
  high: 'high',
  medium: 'medium',
  low: 'low',
};

export const STATUS_LABELS: Record<StudentStatus, string> = {
  active: 'Active',
  graduated: 'Graduated',
  withdrawn: 'Withdrawn',
  on_leave: 'On leave',
};

export function statusLabel(status: string): string {
  return (STATUS_LABELS as Record<string, string>)[status] ?? status;
}

/** One date form for every screen. */
export { dateTime } from '../../lib/format';

export function plural(count: number, one: string, many = `${one}s`): string {
  return `${count} ${count === 1 ? one : many}`;
}
