import { RecordsInput } from '../src';

/** A small random university as a dense matrix with gaps; values on a 0-4 grade scale. */
export function randomRecords(
  rand: () => number,
  students: number,
  courses: number,
  fillRate = 0.5,
): RecordsInput & { matrix: (number | null)[][] } {
  const matrix: (number | null)[][] = [];
  const input = {
    students: [] as string[],
    courses: [] as string[],
    terms: [] as string[],
    grades: [] as number[],
    satisfaction: [] as (number | null)[],
  };
  for (let u = 0; u < students; u++) {
    const row: (number | null)[] = [];
    for (let j = 0; j < courses; j++) {
      if (rand() < fillRate) {
        const g = Math.round(rand() * 40) / 10;
        row.push(g);
        input.students.push(`s${u}`);
        input.courses.push(`c${j}`);
        input.terms.push('2024-FA');
        input.grades.push(g);
        input.satisfaction.push(rand() < 0.7 ? 1 + Math.floor(rand() * 5) : null);
      } else row.push(null);
    }
    matrix.push(row);
  }
  return { ...input, matrix };
}

/** mulberry32, so every test case is reproducible. */
export function rng(seed: number): () => number {
  let x = seed >>> 0;
  return () => {
    x = (x + 0x6d2b79f5) >>> 0;
    let t = x;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
