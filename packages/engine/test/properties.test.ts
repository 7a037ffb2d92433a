import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  buildModel,
  explain,
  MEAN_CENTRED_SETTINGS,
  predictStudent,
  scoreBatch,
  toStudentPrediction,
} from '../src';
import { randomRecords, rng } from './helpers';

// Property tests (fast-check) on random universities.
const universe = fc.record({
  seed: fc.integer({ min: 1, max: 1_000_000 }),
  students: fc.integer({ min: 8, max: 40 }),
  courses: fc.integer({ min: 3, max: 14 }),
  fill: fc.double({ min: 0.3, max: 0.9, noNaN: true }),
  k: fc.integer({ min: 1, max: 12 }),
});

describe('properties of a prediction', () => {
  it('the normalised kin weights sum to one and the value lies within m_a + the range of adjusted values', () => {
    fc.assert(
      fc.property(universe, fc.boolean(), ({ seed, students, courses, fill, k }, pearson) => {
        const data = randomRecords(rng(seed), students, courses, fill);
        const model = buildModel(data);
        const settings = {
          ...MEAN_CENTRED_SETTINGS,
          k,
          minNeighbours: 1,
          similarity: pearson ? ('pearson' as const) : ('cosine' as const),
        };
        for (let j = 0; j < courses; j++) {
          const e = explain(model, 's0', `c${j}`, settings);
          if (e.basis !== 'neighbours') continue;
          const sum = e.kin.reduce((a, x) => a + Math.abs(x.weight), 0);
          expect(sum).toBeCloseTo(1, 12);
          expect(e.kin.length).toBeLessThanOrEqual(k);
          const own = data.matrix[0].filter((x): x is number => x !== null);
          const ma = own.reduce((a, b) => a + b, 0) / own.length;
          const devs = e.kin.map((x) => x.deviation);
          expect(e.value!).toBeGreaterThanOrEqual(ma + Math.min(...devs) - 1e-9);
          expect(e.value!).toBeLessThanOrEqual(ma + Math.max(...devs) + 1e-9);
          // Kin are ordered by similarity, all above the minimum of 0.
          e.kin.forEach((x, q) => {
            expect(x.similarity).toBeGreaterThan(0);
            if (q > 0) expect(x.similarity).toBeLessThanOrEqual(e.kin[q - 1].similarity);
          });
        }
      }),
      { numRuns: 60 },
    );
  });

  it('adding students who share no course with anyone does not change a kin-based answer', () => {
    // IUF is off here: N, the number of students, enters every IUF weight ln(N / n_j), so with
    // IUF on new students legitimately rescale all similarities.
    fc.assert(
      fc.property(
        universe,
        fc.integer({ min: 1, max: 10 }),
        ({ seed, students, courses, fill, k }, extra) => {
          const data = randomRecords(rng(seed), students, courses, fill);
          const settings = {
            ...MEAN_CENTRED_SETTINGS,
            k,
            minNeighbours: 1,
            iuf: false,
          };
          const before = predictStudent(buildModel(data), 's0', undefined, settings);
          const more = {
            students: [...data.students],
            courses: [...data.courses],
            terms: [...data.terms],
            grades: [...(data.grades as number[])],
            satisfaction: [...(data.satisfaction as (number | null)[])],
          };
          for (let x = 0; x < extra; x++) {
            more.students.push(`zz${x}`, `zz${x}`);
            more.courses.push(`other${x}a`, `other${x}b`);
            more.terms.push('2024-FA', '2024-FA');
            more.grades.push(1 + (x % 3), 3);
            more.satisfaction.push(null, 4);
          }
          const after = predictStudent(
            buildModel(more),
            's0',
            before.predictions.map((p) => p.course),
            settings,
          );
          before.predictions.forEach((p, t) => {
            const q = after.predictions[t];
            if (p.grade.basis === 'neighbours') {
              expect(q.grade.basis).toBe('neighbours');
              expect(q.grade.value).toBe(p.grade.value);
              expect(q.grade.neighbours).toBe(p.grade.neighbours);
            }
          });
        },
      ),
      { numRuns: 40 },
    );
  });

  it('batch scoring on worker threads equals one-at-a-time scoring', async () => {
    await fc.assert(
      fc.asyncProperty(universe, async ({ seed, students, courses, fill, k }) => {
        const data = randomRecords(rng(seed), students, courses, fill);
        const model = buildModel(data);
        const settings = {
          ...MEAN_CENTRED_SETTINGS,
          k,
          minNeighbours: 2,
        };
        const keys = [...new Set(data.students)].slice(0, 12);
        keys.push('nobody-yet');
        const batch = await scoreBatch(
          model,
          { students: keys, settings },
          { workers: 2, chunkSize: 3 },
        );
        keys.forEach((s, x) => {
          const single = predictStudent(model, s, undefined, settings);
          const strip = (p: typeof single) =>
            p.predictions.map((c) => ({
              ...c,
              grade: { ...c.grade, spread: null },
              satisfaction: { ...c.satisfaction, spread: null },
            }));
          expect(strip(toStudentPrediction(model, batch[x]))).toEqual(strip(single));
        });
      }),
      { numRuns: 8 },
    );
  });
});
