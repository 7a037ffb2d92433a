import { describe, expect, it } from 'vitest';
import {
  driversSentence,
  forecastFlag,
  neutraliseCell,
  toCsv,
  utilisation,
} from './forecast-rules';
import { verdict } from './forecasts.service';

describe('outlook rules', () => {
  it('flags over-subscription first, never a new elective at risk for that alone', () => {
    expect(forecastFlag(50, 41, 40, 10)).toBe('over_subscribed');
    expect(forecastFlag(3, 0, 40, 10, true)).toBe('no_history');
    expect(forecastFlag(60, 45, 40, 10, true)).toBe('over_subscribed');
    expect(forecastFlag(3, 0, 40, 10)).toBe('at_risk');
    expect(forecastFlag(30, 20, 40, 10)).toBe('balanced');
    expect(utilisation(30, 40)).toBe(0.75);
    expect(utilisation(30, 0)).toBeNull();
  });

  it('writes CSV cells a spreadsheet will not run', () => {
    expect(neutraliseCell('=1+1')).toBe("'=1+1");
    expect(toCsv(['a', 'b'], [['x,y', '-2']])).toBe('a,b\r\n"x,y",\'-2\r\n');
  });

  it('says what drives demand in plain words', () => {
    // θ order: take-up, programme, stage, programme × stage, year × level, prerequisites.
    const s = driversSentence([0.2, 0.8, 0.1, 0.1, 0.7, -8], [0.1, 0.9, 0.05, 0.02, 0.6, 4]);
    expect(s).toBe(
      'Programme and year of study against the course level matter most; prerequisites are rarely waived.',
    );
    expect(driversSentence([1, 0, 0, 0, 0, -0.2], [0.5, 0, 0, 0, 0, 0])).toMatch(
      /^How many students .* matters most; prerequisites are often waived\.$/,
    );
  });

  it('says so in one sentence when the model does not beat the best simple forecast', () => {
    const t = (m: number, n: number, s: number, u: number) => ({
      term: '2026-FA',
      modelWape: m,
      naiveWape: n,
      sameTermWape: s,
      takeUpWape: u,
      coverage: 0.8,
    });
    expect(verdict([t(0.12, 0.37, 0.4, 0.2)])).toBeNull();
    expect(verdict([t(0.25, 0.37, 0.4, 0.2), t(0.25, 0.3, 0.4, 0.2)])).toBe(
      'Over the last 2 completed terms the model did not beat the take-up rate times the students open to each elective: its mean WAPE was 25.0 % against 20.0 %, so weigh its figures accordingly.',
    );
  });
});
