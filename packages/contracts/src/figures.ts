/**
 * One rounding rule for estimates wherever they are shown: on screen, in print and in the
 * summary e-mail. Half away from zero at the last decimal kept, as `toFixed` does for these values.
 */
export const ESTIMATE_DECIMALS = { grade: 2, satisfaction: 2 } as const;

/** A predicted or observed satisfaction (1 to 5) as shown: "3.27". */
export function satisfactionText(value: number): string {
  return value.toFixed(ESTIMATE_DECIMALS.satisfaction);
}

/** Grade points as shown: "3.41". */
export function gradePointsText(value: number): string {
  return value.toFixed(ESTIMATE_DECIMALS.grade);
}
