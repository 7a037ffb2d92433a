import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { buildModel, generateUniversity, resolveSettings, similarities, SIGNALS } from '../src';
import type { RecordsInput, Settings } from '../src';
import { Scorer, untakenCourses } from '../src/score';
import { randomRecords, rng } from './helpers';

// The scorer picks neighbourhoods by a best-first walk over candidates plus bucketed column
// scans. Here every neighbourhood is checked against the plain definition: all students with
// a value in the course and w above the minimum, sorted by (w descending, key ascending), the
// first k. Similarities come from `similarities`, which computes them on its own route.

function reference(
  model: ReturnType<typeof buildModel>,
  student: string,
  settings: Settings,
): Map<number, number> {
  const w = new Map<number, number>();
  for (const kin of similarities(model, student, settings)) {
    w.set(model.studentIndex.get(kin.student)!, kin.similarity);
  }
  return w;
}

function checkStudent(model: ReturnType<typeof buildModel>, student: string, settings: Settings) {
  const a = model.studentIndex.get(student) ?? -1;
  const targets = untakenCourses(model, a, settings.similaritySignal);
  const scorer = new Scorer(model);
  scorer.score(a, targets, settings, SIGNALS);
  const w = reference(model, student, settings);
  const keys = model.studentKeys;
  for (const s of SIGNALS) {
    const d = model.signals[s];
    targets.forEach((j, t) => {
      const members: number[] = [];
      for (let q = d.colPtr[j]; q < d.colPtr[j + 1]; q++) {
        const i = d.colStudent[q];
        if (i !== a && w.has(i)) members.push(q);
      }
      members.sort((p, q) => {
        const x = d.colStudent[p];
        const y = d.colStudent[q];
        const byW = w.get(y)! - w.get(x)!;
        return byW !== 0 ? byW : keys[x] < keys[y] ? -1 : 1;
      });
      const best = members.slice(0, settings.k);
      const got = scorer.neighbourhood(s, t);
      expect(got.w).toEqual(best.map((q) => w.get(d.colStudent[q])!));
      expect(got.deviation).toEqual(best.map((q) => d.colValue[q] - d.mean[d.colStudent[q]]));
    });
  }
  return scorer.stats;
}

/** A generated university plus near-copies of some students (ties in w, other outcomes). */
function universityWithTwins(seed: number, students: number): RecordsInput {
  const u = generateUniversity({ students, courses: 300, programmes: 6, seed });
  const rand = rng(seed);
  const out = {
    students: [...u.students],
    courses: [...u.courses],
    terms: [...u.terms],
    grades: Array.from(u.grades),
    satisfaction: Array.from(u.satisfaction),
  };
  const letters = [0, 1, 2, 2.3, 2.7, 3, 3.3, 3.7, 4];
  const twin = new Map<string, string>();
  for (let r = 0; r < u.students.length; r++) {
    const key = u.students[r];
    if (!twin.has(key))
      twin.set(key, rand() < 0.1 ? `${key.slice(0, 4)}${rand() < 0.5 ? 0 : 9}${key.slice(4)}` : '');
    const t = twin.get(key)!;
    if (!t) continue;
    out.students.push(t);
    out.courses.push(u.courses[r]);
    out.terms.push(u.terms[r]);
    out.grades.push(rand() < 0.2 ? letters[Math.floor(rand() * letters.length)] : u.grades[r]);
    out.satisfaction.push(rand() < 0.2 ? 1 + Math.floor(rand() * 5) : u.satisfaction[r]);
  }
  return out;
}

describe('neighbourhood selection', () => {
  it('equals sorting every candidate by (-w, key) on generated universities with twins', () => {
    let walked = 0;
    let scanned = 0;
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1_000_000 }),
        fc.integer({ min: 1, max: 40 }),
        fc.constantFrom(0, 0.02, -0.1),
        fc.constantFrom('cosine' as const, 'pearson' as const),
        (seed, k, minSimilarity, similarity) => {
          const model = buildModel(universityWithTwins(seed, 1500));
          const settings = resolveSettings({ k, minSimilarity, similarity });
          const keys = model.studentKeys;
          for (let x = 0; x < 3; x++) {
            const stats = checkStudent(model, keys[(seed + x * 997) % keys.length], settings);
            walked += stats.walked;
            scanned += stats.scanned;
          }
        },
      ),
      { numRuns: 8 },
    );
    // Both routes ran.
    expect(walked).toBeGreaterThan(0);
    expect(scanned).toBeGreaterThan(0);
  });

  it('equals sorting every candidate by (-w, key) on small random matrices', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1_000_000 }),
        fc.integer({ min: 5, max: 60 }),
        fc.integer({ min: 2, max: 15 }),
        fc.integer({ min: 0, max: 12 }),
        fc.constantFrom(0, -0.3),
        (seed, students, courses, k, minSimilarity) => {
          const data = randomRecords(rng(seed), students, courses, 0.5);
          const model = buildModel(data);
          const settings = resolveSettings({ k, minSimilarity });
          for (const s of ['s0', 's1', 'nobody']) checkStudent(model, s, settings);
        },
      ),
      { numRuns: 60 },
    );
  });
});
