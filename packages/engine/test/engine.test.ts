import { describe, expect, it } from 'vitest';
import {
  buildModel,
  CONFIDENCE_DESCRIPTION,
  evaluate,
  explain,
  predictStudent,
  RecordError,
  scoreBatch,
  similarities,
} from '../src';
import { similarityTerms, resolveSettings } from '../src/api';
import { randomRecords, rng } from './helpers';
import { MEAN_CENTRED_SETTINGS as MC } from '../src/types';

const T = (n: number) => Array.from({ length: n }, () => '2024-FA');

describe('input checks', () => {
  it('refuses an empty key, naming the record', () => {
    expect(() =>
      buildModel({ students: ['a', ''], courses: ['X 1', 'X 2'], terms: T(2), grades: [3, 2] }),
    ).toThrow(/record 1 \(student "", course "X 2"\): empty student key/);
  });
  it('refuses a value outside a given scale and an infinite value', () => {
    const input = { students: ['a', 'b'], courses: ['X 1', 'X 1'], terms: T(2), grades: [3, 4.5] };
    expect(() => buildModel(input, { scales: { grade: { min: 0, max: 4 } } })).toThrow(RecordError);
    expect(() => buildModel(input, { scales: { grade: { min: 0, max: 4 } } })).toThrow(
      /record 1 .*"b".*outside the scale/,
    );
    expect(() => buildModel({ ...input, grades: [3, Infinity] })).toThrow(/not finite/);
    expect(() =>
      buildModel(
        { ...input, satisfaction: [1, 9] },
        { scales: { satisfaction: { min: 1, max: 5 } } },
      ),
    ).toThrow(/satisfaction 9/);
  });
  it('keeps the most recent attempt with a value', () => {
    const m = buildModel({
      students: ['a', 'a', 'a'],
      courses: ['X 1', 'X 1', 'X 1'],
      terms: ['2023-FA', '2024-FA', '2022-FA'],
      grades: [1, 3, 4],
      satisfaction: [2, null, 5],
    });
    expect(m.signals.grade.rowValue[0]).toBe(3);
    expect(m.signals.satisfaction.rowValue[0]).toBe(2);
  });
});

describe('predictions', () => {
  const data = randomRecords(rng(7), 60, 15, 0.6);
  const model = buildModel(data, {
    scales: { grade: { min: 0, max: 4 }, satisfaction: { min: 1, max: 5 } },
  });

  it('never returns NaN; baseline and none say so', () => {
    const p = predictStudent(model, 's1', ['c1', 'c2', 'no such course'], {
      ...MC,
      minNeighbours: 1000,
    });
    expect(p.predictions[0].grade.basis).toBe('baseline');
    expect(p.predictions[2].grade).toMatchObject({ basis: 'none', value: null, neighbours: 0 });
    expect(p.predictions[2].fit).toBeNull();
    for (const c of predictStudent(model, 's1', undefined, MC).predictions) {
      for (const v of [c.grade.value, c.satisfaction.value, c.fit])
        if (v !== null) expect(Number.isFinite(v)).toBe(true);
      expect(c.grade.value!).toBeGreaterThanOrEqual(0);
      expect(c.grade.value!).toBeLessThanOrEqual(4);
    }
  });

  it('a new student gets the baseline with b_a = 0', () => {
    const p = predictStudent(model, 'brand new', ['c3'], MC).predictions[0];
    const d = model.signals.grade;
    const j = model.courseIndex.get('c3')!;
    expect(p.grade.basis).toBe('baseline');
    expect(p.grade.value).toBeCloseTo(d.globalMean + d.courseBias[j], 12);
  });

  it('fit combines both signals with alpha and takes the lower confidence', () => {
    const c = predictStudent(model, 's2', ['c4'], { ...MC, alpha: 0.25, minNeighbours: 1 })
      .predictions[0];
    const g = (c.grade.value! - 0) / 4;
    const s = (c.satisfaction.value! - 1) / 4;
    expect(c.fit).toBeCloseTo(100 * (0.25 * g + 0.75 * s), 10);
    expect(c.fitFrom).toBe('both');
    expect(CONFIDENCE_DESCRIPTION).toMatch(/High/);
  });

  it('neighbourhood ties go to the smaller student key', () => {
    // b and c are identical, so they tie for a's single neighbour slot; b wins.
    const m = buildModel({
      students: ['a', 'a', 'a', 'c', 'c', 'c', 'b', 'b', 'b'],
      courses: ['X 1', 'X 2', 'X 3', 'X 1', 'X 2', 'X 4', 'X 1', 'X 2', 'X 4'],
      terms: T(9),
      grades: [4, 2, 3, 4, 2, 1, 4, 2, 3],
    });
    const e = explain(m, 'a', 'X 4', { ...MC, k: 1, minNeighbours: 1, iuf: false });
    expect(e.kin.map((x) => x.student)).toEqual(['b']);
    expect(e.value).toBeCloseTo(3 + (3 - 3), 12);
  });

  it('significance weighting scales w by min(overlap, g) / g', () => {
    const plain = new Map(similarities(model, 's0', MC).map((k) => [k.student, k]));
    for (const k of similarities(model, 's0', { ...MC, significance: 50, minSimilarity: -2 })) {
      const p = plain.get(k.student);
      if (p) expect(k.similarity).toBeCloseTo((p.similarity * Math.min(p.overlap, 50)) / 50, 12);
    }
  });

  it('explains: per-course terms add up to each similarity; outcomes hidden under 5 kin', () => {
    const e = explain(model, 's3', 'c5', { ...MC, minNeighbours: 1 });
    const st = resolveSettings(MC);
    const a = model.studentIndex.get('s3')!;
    for (const x of e.kin) {
      const terms = similarityTerms(model, a, model.studentIndex.get(x.student)!, st);
      expect([...terms.values()].reduce((s, t) => s + t, 0)).toBeCloseTo(x.similarity, 12);
    }
    expect(e.sharedCourses.length).toBeGreaterThan(0);
    expect(e.outcomes === null).toBe(e.neighbours < 5);
    const few = explain(model, 's3', 'c5', { ...MC, k: 3, minNeighbours: 1 });
    expect(few.outcomes).toBeNull();
  });
});

describe('evaluation', () => {
  it('time holdout: baselines by hand on a tiny university', () => {
    const students = ['a', 'a', 'a', 'a', 'b', 'b', 'b', 'b'];
    const courses = ['X 1', 'X 2', 'X 3', 'X 4', 'X 1', 'X 2', 'X 3', 'X 4'];
    const terms = ['1', '1', '2', '3', '1', '2', '2', '3'];
    const grades = [4, 3, 2, 3, 2, 1, 2, 4];
    const r = evaluate({ students, courses, terms, grades }, { holdoutTerm: '3' }).signals.grade!;
    // Training mean (4+3+2+2+1+2)/6 = 14/6; truths 3 (a) and 4 (b).
    const mu = 14 / 6;
    expect(r.baselines.globalMean.n).toBe(2);
    expect(r.baselines.globalMean.mae).toBeCloseTo((Math.abs(mu - 3) + Math.abs(mu - 4)) / 2, 12);
    expect(r.baselines.studentMean.mae).toBeCloseTo(
      (Math.abs(3 - 3) + Math.abs(5 / 3 - 4)) / 2,
      12,
    );
    expect(r.baselines.courseMean.coverage).toBe(0);
    expect(r.configurations[0].n).toBe(2);
  });
  it('k-fold covers every cell once', () => {
    const data = randomRecords(rng(3), 30, 8, 0.6);
    const r = evaluate(data, { folds: 4, seed: 9 }, [
      {},
      { similarity: 'pearson', centring: 'studentMean', minNeighbours: 2 },
    ]).signals.grade!;
    expect(r.baselines.globalMean.n).toBe(data.students.length);
    expect(r.configurations).toHaveLength(2);
    expect(r.configurations[1].coverage!).toBeGreaterThan(0);
    for (const c of r.configurations) expect(c.rmse!).toBeGreaterThanOrEqual(c.mae!);
  });
});

describe('batch scoring', () => {
  const model = buildModel(randomRecords(rng(11), 80, 10, 0.5));
  const students = Array.from({ length: 80 }, (_, i) => `s${i}`);
  it('reports progress and can be cancelled', async () => {
    const seen: number[] = [];
    await scoreBatch(
      model,
      { students },
      { workers: 2, chunkSize: 10, onProgress: (d) => seen.push(d) },
    );
    expect(seen.at(-1)).toBe(80);
    const ctl = new AbortController();
    const p = scoreBatch(
      model,
      { students },
      {
        workers: 2,
        chunkSize: 1,
        signal: ctl.signal,
        onProgress: () => ctl.abort(new Error('stop')),
      },
    );
    await expect(p).rejects.toThrow('stop');
    const q = scoreBatch(model, { students }, { workers: 0, chunkSize: 5, signal: ctl.signal });
    await expect(q).rejects.toThrow('stop');
  });
});
