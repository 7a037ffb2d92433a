import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  buildModel,
  generateUniversity,
  MEAN_CENTRED_SETTINGS,
  resolveSettings,
  similarities,
  SIGNALS,
} from '../src';
import type { RecordsInput, Settings } from '../src';
import { Scorer, targetSignal, untakenCourses } from '../src/score';
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
  const targets = untakenCourses(model, a, targetSignal(settings));
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

/**
 * A generated university plus groups of clones: students with the same grades as one
 * original (so the same w for everyone) and their own satisfaction answers, so that the tie
 * rule decides who is in a satisfaction neighbourhood.
 */
function universityWithClones(seed: number, students: number): RecordsInput {
  const u = generateUniversity({ students, courses: 300, programmes: 6, seed });
  const rand = rng(seed);
  const out = {
    students: [...u.students],
    courses: [...u.courses],
    terms: [...u.terms],
    grades: Array.from(u.grades),
    satisfaction: Array.from(u.satisfaction),
  };
  const rows = new Map<string, number[]>();
  u.students.forEach((s, r) => rows.set(s, [...(rows.get(s) ?? []), r]));
  const keys = [...rows.keys()];
  for (let g = 0; g < 8; g++) {
    const original = keys[Math.floor(rand() * keys.length)];
    for (let c = 0; c < 24; c++) {
      // Clone keys sort before and after the original and each other.
      const key = `${original.slice(0, 3)}${c % 10}${original.slice(3)}-${c}`;
      for (const r of rows.get(original)!) {
        out.students.push(key);
        out.courses.push(u.courses[r]);
        out.terms.push(u.terms[r]);
        out.grades.push(u.grades[r]);
        out.satisfaction.push(1 + Math.floor(rand() * 5));
      }
    }
  }
  return out;
}

describe('neighbourhood selection', () => {
  it('equals sorting every candidate by (-w, key) on generated universities with clones', () => {
    const work = { walked: 0, scanned: 0, rescans: 0 };
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1_000_000 }),
        fc.constantFrom(10, 30, 40),
        fc.constantFrom(0, 0, 0.02, -0.1),
        fc.constantFrom('cosine' as const, 'cosine' as const, 'pearson' as const),
        (seed, k, minSimilarity, similarity) => {
          const model = buildModel(universityWithClones(seed, 1500));
          const settings = resolveSettings({
            ...MEAN_CENTRED_SETTINGS,
            k,
            minSimilarity,
            similarity,
          });
          const keys = model.studentKeys;
          for (let x = 0; x < 4; x++) {
            const stats = checkStudent(model, keys[(seed + x * 997) % keys.length], settings);
            work.walked += stats.walked;
            work.scanned += stats.scanned;
            work.rescans += stats.rescans;
          }
        },
      ),
      { numRuns: 10, seed: 42 },
    );
    // Every route ran: the walk, the scans, and a scan whose guessed bar let too few through.
    expect(work.walked).toBeGreaterThan(0);
    expect(work.scanned).toBeGreaterThan(0);
    expect(work.rescans).toBeGreaterThan(0);
  }, 120_000);

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
          const settings = resolveSettings({ ...MEAN_CENTRED_SETTINGS, k, minSimilarity });
          for (const s of ['s0', 's1', 'nobody']) checkStudent(model, s, settings);
        },
      ),
      { numRuns: 60 },
    );
  });
});
