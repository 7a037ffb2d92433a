import { describe, expect, it } from 'vitest';
import {
  evaluate,
  MEAN_CENTRED_SETTINGS,
  RANGE_MIN_CELLS,
  rangeTable,
  suggestSettings,
} from '../src';
// The Halden Reach demo generator (tools/demo), the data the product ships with.
// @ts-expect-error plain ES module without types
import { generate } from '../../../tools/demo/generate.mjs';

const POINTS: Record<string, number> = {
  A: 4,
  'A-': 3.7,
  'B+': 3.3,
  B: 3,
  'B-': 2.7,
  'C+': 2.3,
  C: 2,
  'C-': 1.7,
  'D+': 1.3,
  D: 1,
  'D-': 0.7,
  F: 0,
};

function demoRecords() {
  const { records } = generate() as { records: string[][] };
  const termKey = (t: string) => {
    const [y, s] = t.split('-');
    return `${y}-${['WI', 'SP', 'SU', 'FA'].indexOf(s) + 1}`;
  };
  return {
    students: records.map((r) => r[0]),
    terms: records.map((r) => termKey(r[1])),
    courses: records.map((r) => r[2]),
    grades: records.map((r) => (r[3] in POINTS ? POINTS[r[3]] : null)),
    satisfaction: records.map((r) => (r[4] === '' ? null : Number(r[4]))),
  };
}

describe('likely ranges', () => {
  it('cover 75-85 % of the demo holdout (80 % ranges from the term before)', () => {
    const report = evaluate(demoRecords(), { holdoutTerm: '2026-4' }, [{}, MEAN_CENTRED_SETTINGS], {
      scales: { grade: { min: 0, max: 4 }, satisfaction: { min: 1, max: 5 } },
      ranges: true,
    });
    for (const s of ['grade', 'satisfaction'] as const) {
      const b = report.signals[s]!.baselines;
      console.log(
        `demo holdout 2026-FA, ${s}, baselines (MAE / RMSE):`,
        Object.entries(b)
          .map(([k, m]) => `${k} ${m.mae!.toFixed(4)} / ${m.rmse!.toFixed(4)}`)
          .join(', '),
      );
      for (const c of report.signals[s]!.configurations) {
        console.log(
          `demo holdout 2026-FA, ${s}, ${c.settings.centring}: MAE ${c.mae!.toFixed(4)}, RMSE ${c.rmse!.toFixed(4)}, n ${c.n}`,
        );
        const r = c.ranges!;
        console.log(
          `demo holdout 2026-FA, ${s}, ${c.settings.centring}: range coverage ${(100 * r.coverage!).toFixed(1)} %`,
          `(ranges from ${r.calibrationTerm}, mean width ${r.meanWidth!.toFixed(2)}),`,
          `MAE margin over ${c.margin!.baseline} ${c.margin!.mae.toFixed(4)}`,
          `[${c.margin!.low.toFixed(4)}, ${c.margin!.high.toFixed(4)}]`,
        );
        expect(r.coverage!).toBeGreaterThanOrEqual(0.75);
        expect(r.coverage!).toBeLessThanOrEqual(0.85);
      }
    }
  }, 60_000);

  it('bins hold at least the minimum of cells and the quantiles bracket 80 %', () => {
    const n = 1000;
    const cells = {
      estimate: new Float64Array(n).fill(2),
      truth: Float64Array.from({ length: n }, (_, i) => 2 + ((i % 100) - 49.5) / 100),
      records: Int32Array.from({ length: n }, (_, i) => 3 + (i % 7)),
      strength: Float64Array.from({ length: n }, (_, i) => (i * 7919) % 13),
    };
    const t = rangeTable(cells, 'grade', '2026-2', { min: 0, max: 4 });
    for (const b of t.bins) expect(b.n).toBeGreaterThanOrEqual(RANGE_MIN_CELLS);
    const all = t.bins.reduce((s, b) => s + b.n, 0);
    expect(all).toBe(n);
    // Residuals uniform on [-0.495, 0.495]: 10 % and 90 % quantiles near -0.396 and 0.396.
    for (const b of t.bins) {
      expect(b.low).toBeCloseTo(-0.396, 1);
      expect(b.high).toBeCloseTo(0.396, 1);
    }
  });
});

describe('suggest settings', () => {
  it('judges the grid on the term before the holdout and reports the gain on the holdout', () => {
    const grid = [{}, { shrinkage: 0, k: 5 }, { centring: 'studentMean' as const }];
    const s = suggestSettings(demoRecords(), '2026-4', MEAN_CENTRED_SETTINGS, {
      grid,
      scales: { grade: { min: 0, max: 4 }, satisfaction: { min: 1, max: 5 } },
    });
    console.log(
      `suggest settings on the demo: tuned on ${s.tuningTerm}`,
      s.tried.map((t) => t.score.toFixed(4)).join(', '),
      `; holdout mean MAE best ${s.holdout.best.toFixed(4)}, in force ${s.holdout.current.toFixed(4)}`,
    );
    expect(s.tuningTerm).toBe('2026-2');
    // The chosen point has the lowest tuning score, and the gain is measured on the holdout.
    const min = Math.min(...s.tried.map((t) => t.score));
    expect(s.tried.find((t) => t.settings === s.best)?.score).toBe(min);
    expect(s.holdout.gain).toBeCloseTo(s.holdout.current - s.holdout.best, 12);
    expect(s.tried).toHaveLength(3);
  }, 60_000);
});
