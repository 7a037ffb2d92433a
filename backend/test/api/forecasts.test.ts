import type { BacktestResponse, CourseForecast, ForecastAbout } from '@kinpath/contracts';
import { beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn } from '../support/api';

/** The shared demo server: its first outlook run starts at boot and takes a few seconds. */
async function waitForOutlook(token: string): Promise<ForecastAbout> {
  const deadline = Date.now() + 120_000;
  for (;;) {
    const res = await api()
      .get('/api/forecasts/about')
      .set(...bearer(token));
    expect(res.status).toBe(200);
    const about = res.body as ForecastAbout;
    if (about.run) return about;
    if (Date.now() > deadline) throw new Error(`No finished outlook run: ${res.text}`);
    await new Promise((r) => setTimeout(r, 1000));
  }
}

let head: string;
let registrar: string;
let advisor: string;

beforeAll(async () => {
  head = await signIn(DEMO_USERS.department_head);
  registrar = await signIn(DEMO_USERS.registrar);
  advisor = await signIn(DEMO_USERS.advisor);
  await waitForOutlook(registrar);
}, 150_000);

describe('GET /api/forecasts', () => {
  it('gives the head of CMP the CMP electives only, with intervals and flags', async () => {
    const res = await api()
      .get('/api/forecasts')
      .set(...bearer(head));
    expect(res.status).toBe(200);
    const rows = res.body as CourseForecast[];
    expect(rows.length).toBeGreaterThan(0);
    for (const r of rows) {
      expect(r.department).toBe('CMP');
      expect(r.low).toBeLessThanOrEqual(r.expected);
      expect(r.high).toBeGreaterThanOrEqual(r.expected);
      expect(['over_subscribed', 'at_risk', 'no_history', 'balanced']).toContain(r.flag);
      expect(typeof r.noHistory).toBe('boolean');
      if (r.noHistory) expect(r.flag).not.toBe('at_risk');
      if (r.flag === 'over_subscribed') expect(r.low).toBeGreaterThan(r.capacity);
      if (r.capacity > 0) expect(r.utilisation).toBeCloseTo(r.expected / r.capacity, 9);
    }
  });

  it('answers 403, not an empty list, when the head of CMP asks for another department', async () => {
    const res = await api()
      .get('/api/forecasts?department=MTH')
      .set(...bearer(head));
    expect(res.status).toBe(403);
    expect(res.body.message).toMatch(/CMP/);
    const backtest = await api()
      .get('/api/forecasts/backtest?department=MTH')
      .set(...bearer(head));
    expect(backtest.status).toBe(403);
    const csv = await api()
      .get('/api/forecasts/export?department=MTH')
      .set(...bearer(head));
    expect(csv.status).toBe(403);
  });

  it('lets registrar staff see every department and filter one', async () => {
    const all = (
      await api()
        .get('/api/forecasts')
        .set(...bearer(registrar))
    ).body as CourseForecast[];
    expect(new Set(all.map((r) => r.department)).size).toBeGreaterThan(1);
    const mth = await api()
      .get('/api/forecasts?department=MTH')
      .set(...bearer(registrar));
    expect(mth.status).toBe(200);
    expect((mth.body as CourseForecast[]).every((r) => r.department === 'MTH')).toBe(true);
  });

  it('moves electives to at risk as the threshold rises', async () => {
    const low = (
      await api()
        .get('/api/forecasts?atRiskBelow=0')
        .set(...bearer(registrar))
    ).body as CourseForecast[];
    expect(low.some((r) => r.flag === 'at_risk')).toBe(false);
    const high = (
      await api()
        .get('/api/forecasts?atRiskBelow=100000')
        .set(...bearer(registrar))
    ).body as CourseForecast[];
    expect(high.every((r) => r.flag !== 'balanced')).toBe(true);
  });

  it('refuses other roles and bad input', async () => {
    expect(
      (
        await api()
          .get('/api/forecasts')
          .set(...bearer(advisor))
      ).status,
    ).toBe(403);
    expect((await api().get('/api/forecasts')).status).toBe(401);
    expect(
      (
        await api()
          .get('/api/forecasts?term=2027-XX')
          .set(...bearer(head))
      ).status,
    ).toBe(400);
    expect(
      (
        await api()
          .get('/api/forecasts?atRiskBelow=-1')
          .set(...bearer(head))
      ).status,
    ).toBe(400);
  });
});

describe('CSV export', () => {
  it('exports the head’s table as CSV, also with Accept: text/csv', async () => {
    const res = await api()
      .get('/api/forecasts/export')
      .set(...bearer(head));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    const lines = res.text.trim().split('\r\n');
    expect(lines[0]).toBe(
      'term,course_code,title,department,sections,seats,expected,interval_low_80,interval_high_80,utilisation_percent,flag,no_history',
    );
    expect(lines.slice(1).every((l) => l.includes(',CMP,'))).toBe(true);
    const negotiated = await api()
      .get('/api/forecasts')
      .set(...bearer(head))
      .set('Accept', 'text/csv');
    expect(negotiated.headers['content-type']).toMatch(/text\/csv/);
    expect(negotiated.text).toBe(res.text);
  });
});

describe('GET /api/forecasts/about', () => {
  it('counts a head’s own department’s offerings, not the institution’s', async () => {
    const mine = (
      await api()
        .get('/api/forecasts/about')
        .set(...bearer(head))
    ).body as ForecastAbout;
    const all = (
      await api()
        .get('/api/forecasts/about')
        .set(...bearer(registrar))
    ).body as ForecastAbout;
    const rows = (
      await api()
        .get('/api/forecasts')
        .set(...bearer(head))
    ).body as CourseForecast[];
    expect(mine.offerings).toBe(rows.length);
    expect(all.offerings).toBeGreaterThan(mine.offerings);
    expect(all.drivers).toMatch(/matter/);
  });
});

describe('GET /api/forecasts/backtest', () => {
  it('beats the naive forecast on each of the last three completed terms of the demo', async () => {
    const res = await api()
      .get('/api/forecasts/backtest')
      .set(...bearer(registrar));
    expect(res.status).toBe(200);
    const b = res.body as BacktestResponse;
    expect(b.terms).toHaveLength(3);
    const pct = (x: number | null) => (x === null ? '-' : `${(100 * x).toFixed(1)} %`);
    for (const t of b.terms) {
      process.stdout.write(
        `backtest ${t.term}: model ${pct(t.modelWape)}, naive ${pct(t.naiveWape)}, same term a year before ${pct(t.sameTermWape)}, take-up ${pct(t.takeUpWape)}, coverage ${pct(t.coverage)}\n`,
      );
      expect(t.modelWape).not.toBeNull();
      expect(t.modelWape as number).toBeLessThan(t.naiveWape as number);
    }
    expect(b.term).toBe(b.terms[2].term);
    expect(b.verdict).toBeNull();
    expect(b.courses.length).toBeGreaterThan(0);
    const sum = (f: (c: BacktestResponse['courses'][number]) => number) =>
      b.courses.reduce((s, c) => s + f(c), 0);
    const actual = sum((c) => c.actual);
    expect(b.modelWape).toBeCloseTo(sum((c) => Math.abs(c.forecast - c.actual)) / actual, 9);
    expect(b.naiveWape).toBeCloseTo(sum((c) => Math.abs(c.naive - c.actual)) / actual, 9);
    expect(b.modelWape).toBeCloseTo(b.terms[2].modelWape as number, 9);
    expect(b.coverage).toBeCloseTo(b.courses.filter((c) => c.inside).length / b.courses.length, 9);
    const earlier = (
      await api()
        .get(`/api/forecasts/backtest?term=${b.terms[0].term}`)
        .set(...bearer(head))
    ).body as BacktestResponse;
    expect(earlier.term).toBe(b.terms[0].term);
    expect(earlier.courses.every((c) => c.department === 'CMP')).toBe(true);
    const missing = await api()
      .get('/api/forecasts/backtest?term=2019-FA')
      .set(...bearer(registrar));
    expect(missing.status).toBe(404);
  });
});

describe('GET /api/forecasts/runs', () => {
  it('shows registrar staff the outlook runs with their progress', async () => {
    const res = await api()
      .get('/api/forecasts/runs')
      .set(...bearer(registrar));
    expect(res.status).toBe(200);
    expect(res.body[0]).toMatchObject({
      stepsTotal: expect.any(Number),
      status: expect.any(String),
    });
    expect(
      (
        await api()
          .get('/api/forecasts/runs')
          .set(...bearer(head))
      ).status,
    ).toBe(403);
  });
});
