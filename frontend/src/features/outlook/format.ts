/** Fixed decimals for the outlook's numbers (dense tables, right-aligned). */
export function fixed(value: number | null | undefined, digits = 1): string {
  return value === null || value === undefined ? '–' : value.toFixed(digits);
}

export function percent(value: number | null | undefined, digits = 0): string {
  return value === null || value === undefined ? '–' : `${(value * 100).toFixed(digits)} %`;
}
