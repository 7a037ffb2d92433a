import cosineSimilarity from 'compute-cosine-similarity';
import { describe, expect, it } from 'vitest';
import { buildModel, MEAN_CENTRED_SETTINGS, similarities } from '../src';
import { similarityView } from '../src/model';
import { resolveSettings } from '../src/api';
import { randomRecords, rng } from './helpers';

/*
 * Source: the npm package compute-cosine-similarity (a general-purpose cosine of two numeric
 * arrays), applied to zero-filled, IUF-transformed vectors as method.md defines: each value is
 * x_uj = r_uj - m_u (centring on) or r_uj, multiplied by f_j = ln(N / n_j) (Breese, Heckerman
 * and Kadie 1998), missing cells 0.
 */
function meanOf(row: (number | null)[]): number {
  const v = row.filter((x): x is number => x !== null);
  return v.reduce((a, b) => a + b, 0) / v.length;
}

describe('cosine with IUF against compute-cosine-similarity', () => {
  for (const center of [true, false]) {
    it(`random matrices, centring ${center ? 'on' : 'off'}`, () => {
      for (let seed = 1; seed <= 5; seed++) {
        const data = randomRecords(rng(seed), 25, 12, 0.55);
        // One course everyone takes, so one IUF weight is exactly zero.
        data.matrix.forEach((row, u) => {
          if (row[0] === null) {
            row[0] = 2;
            data.students.push(`s${u}`);
            data.courses.push('c0');
            data.terms.push('2024-FA');
            (data.grades as number[]).push(2);
            (data.satisfaction as (number | null)[]).push(null);
          }
        });
        const model = buildModel(data);
        const N = data.matrix.filter((r) => r.some((x) => x !== null)).length;
        const f = data.matrix[0].map((_, j) => {
          const n = data.matrix.filter((r) => r[j] !== null).length;
          return n ? Math.log(N / n) : 0;
        });
        const vec = (u: number): number[] => {
          const m = meanOf(data.matrix[u]);
          return data.matrix[u].map((x, j) => (x === null ? 0 : f[j] * (center ? x - m : x)));
        };
        for (const a of [0, 3, 7]) {
          const kin = similarities(model, `s${a}`, {
            ...MEAN_CENTRED_SETTINGS,
            centring: center ? 'studentMean' : 'none',
            minSimilarity: -2,
          });
          const got = new Map(kin.map((k) => [k.student, k.similarity]));
          for (let i = 0; i < data.matrix.length; i++) {
            if (i === a) continue;
            const ref = cosineSimilarity(vec(a), vec(i));
            const expected = ref === null || !Number.isFinite(ref) ? 0 : ref;
            expect(got.get(`s${i}`) ?? 0).toBeCloseTo(expected, 10);
          }
        }
      }
    });
  }
});

describe('inverse user frequency against its formula ln(N / n_j)', () => {
  it('matches ln(N/n_j) and is zero for a course everyone took', () => {
    const students = ['a', 'a', 'b', 'b', 'c', 'd'];
    const courses = ['CORE 1', 'X 1', 'CORE 1', 'X 2', 'CORE 1', 'CORE 1'];
    const model = buildModel({
      students,
      courses,
      terms: students.map(() => '2024-FA'),
      grades: [3, 2, 4, 1, 2, 3],
    });
    const f = similarityView(model, 'grade', resolveSettings(MEAN_CENTRED_SETTINGS)).f;
    expect(f[model.courseIndex.get('CORE 1')!]).toBe(0);
    expect(f[model.courseIndex.get('X 1')!]).toBeCloseTo(Math.log(4 / 1), 15);
    expect(f[model.courseIndex.get('X 2')!]).toBeCloseTo(Math.log(4), 15);
    const off = similarityView(
      model,
      'grade',
      resolveSettings({ ...MEAN_CENTRED_SETTINGS, iuf: false }),
    ).f;
    expect([...off]).toEqual([1, 1, 1]);
  });
});

describe('Pearson with IUF weights (method.md definition, computed here independently)', () => {
  it('matches a direct implementation on random data', () => {
    const data = randomRecords(rng(42), 20, 10, 0.6);
    const model = buildModel(data);
    const N = data.matrix.filter((r) => r.some((x) => x !== null)).length;
    const f = data.matrix[0].map((_, j) => {
      const n = data.matrix.filter((r) => r[j] !== null).length;
      return n ? Math.log(N / n) : 0;
    });
    for (const a of [0, 5]) {
      const got = new Map(
        similarities(model, `s${a}`, {
          ...MEAN_CENTRED_SETTINGS,
          similarity: 'pearson',
          minSimilarity: -2,
        }).map((k) => [k.student, k.similarity]),
      );
      const ma = meanOf(data.matrix[a]);
      for (let i = 0; i < 20; i++) {
        if (i === a) continue;
        const mi = meanOf(data.matrix[i]);
        let num = 0;
        let da = 0;
        let di = 0;
        data.matrix[a].forEach((x, j) => {
          const y = data.matrix[i][j];
          if (x === null || y === null) return;
          num += f[j] * (x - ma) * (y - mi);
          da += f[j] * (x - ma) ** 2;
          di += f[j] * (y - mi) ** 2;
        });
        const expected = da > 0 && di > 0 ? num / Math.sqrt(da * di) : 0;
        expect(got.get(`s${i}`) ?? 0).toBeCloseTo(expected, 10);
      }
    }
  });
});
