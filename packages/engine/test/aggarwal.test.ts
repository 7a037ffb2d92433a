import { describe, expect, it } from 'vitest';
import { buildModel, MEAN_CENTRED_SETTINGS, predictStudent, similarities } from '../src';

/*
 * Source: C. C. Aggarwal, Recommender Systems: The Textbook (Springer, 2016), section 2.3.1,
 * Table 2.1, the user-based worked example. The ratings below are quoted from memory.
 *
 * The textbook's Pearson takes each user's mean over all of that user's ratings (not only the
 * co-rated items), which is exactly method.md's definition, so its figures are checked directly:
 * the hand computation for users 3 and 1 is (0.5*1 + 1.5*1 + 1.5*1 + 0.5*1) /
 * (sqrt(0.25 + 2.25 + 2.25 + 0.25) * sqrt(4)) = 4 / sqrt(20) = 0.8944.
 * IUF is off (the textbook does not weight items) and at least 2 kin suffice.
 */
const M: (number | null)[][] = [
  [7, 6, 7, 4, 5, 4],
  [6, 7, null, 4, 3, 4],
  [null, 3, 3, 1, 1, null],
  [1, 2, 2, 3, 3, 4],
  [1, null, 1, 2, 3, 3],
];

function textbookModel() {
  const students: string[] = [];
  const courses: string[] = [];
  const grades: number[] = [];
  M.forEach((row, u) =>
    row.forEach((v, j) => {
      if (v === null) return;
      students.push(`user${u + 1}`);
      courses.push(`item${j + 1}`);
      grades.push(v);
    }),
  );
  return buildModel({ students, courses, terms: students.map(() => '2016-FA'), grades });
}

// The original method (mean-centred cosine of grades).
const settings = {
  ...MEAN_CENTRED_SETTINGS,
  similarity: 'pearson' as const,
  iuf: false,
  k: 2,
  minNeighbours: 2,
  minSimilarity: -2, // keep the negative similarities in view
};

describe('Aggarwal (2016) Table 2.1, user-based example', () => {
  const model = textbookModel();

  it('Pearson similarities of user 3 with users 1, 2, 4, 5', () => {
    const kin = similarities(model, 'user3', settings);
    const w = Object.fromEntries(kin.map((k) => [k.student, k.similarity]));
    expect(w.user1).toBeCloseTo(0.894, 3);
    expect(w.user2).toBeCloseTo(0.939, 2); // 0.9385 by hand; the book prints 0.939
    expect(w.user4).toBeCloseTo(-1.0, 3);
    expect(w.user5).toBeCloseTo(-0.817, 2);
    // Hand computation, more digits than the book prints.
    expect(w.user1).toBeCloseTo(4 / Math.sqrt(20), 12);
    expect(w.user5).toBeCloseTo(-2 / Math.sqrt(6), 12);
    // Most similar first; overlap counts co-rated items.
    expect(kin.map((k) => k.student)).toEqual(['user2', 'user1', 'user5', 'user4']);
    expect(kin.map((k) => k.overlap)).toEqual([3, 4, 3, 4]);
  });

  it('mean-centred predictions with k = 2 for user 3 on items 1 and 6', () => {
    const p = predictStudent(model, 'user3', ['item1', 'item6'], settings).predictions;
    expect(p[0].grade.value).toBeCloseTo(3.35, 2);
    expect(p[1].grade.value).toBeCloseTo(0.86, 2);
    expect(p[0].grade.basis).toBe('neighbours');
    expect(p[0].grade.neighbours).toBe(2);
    // The same by hand: 2 + (w1 * (7 - 5.5) + w2 * (6 - 4.8)) / (w1 + w2).
    const w1 = 4 / Math.sqrt(20);
    const w2 = 4.8 / Math.sqrt(8.72 * 3);
    expect(p[0].grade.value).toBeCloseTo(2 + (w1 * 1.5 + w2 * 1.2) / (w1 + w2), 12);
    expect(p[1].grade.value).toBeCloseTo(2 + (w1 * -1.5 + w2 * -0.8) / (w1 + w2), 12);
  });

  it('with the default minimum of 5 kin the baseline serves and says so', () => {
    const p = predictStudent(model, 'user3', ['item1'], { ...settings, minNeighbours: 5 });
    expect(p.predictions[0].grade.basis).toBe('baseline');
  });
});
