import { afterEach, describe, expect, it } from 'vitest';
import { screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type {
  BacktestResponse,
  CourseForecast,
  ForecastAbout,
  ScoringRunSummary,
} from '@kinpath/contracts';
import { installFakeApi } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';
import { backtestVerdict } from './components/BacktestSection';

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const RUN: ScoringRunSummary = {
  id: 'run-1',
  term: '2027-SP',
  settingsVersion: 1,
  reason: 'start',
  status: 'done',
  chunksDone: 3,
  chunksTotal: 3,
  progress: 1,
  students: 901,
  rows: 74179,
  beta: 0.045,
  backtestTerm: '2026-FA',
  error: null,
  createdAt: '2026-12-01T10:00:00.000Z',
  finishedAt: '2026-12-01T10:01:00.000Z',
};

const ABOUT: ForecastAbout = {
  term: '2027-SP',
  offerings: 98,
  run: RUN,
  pending: null,
  betaMethod: 'Beta (0.045) was chosen on 2026-FA as the value with the lowest WAPE.',
  defaultAtRiskBelow: 10,
};

const row = (over: Partial<CourseForecast>): CourseForecast => ({
  courseCode: 'CMP 2110',
  title: 'Data Structures',
  department: 'CMP',
  capacity: 35,
  sections: 1,
  expected: 32.5,
  low: 25.8,
  high: 39.1,
  utilisation: 32.5 / 35,
  flag: 'balanced',
  ...over,
});

const ROWS: CourseForecast[] = [
  row({}),
  row({
    courseCode: 'CMP 1110',
    title: 'Programming Foundations',
    capacity: 20,
    expected: 65.2,
    low: 55.5,
    high: 74.9,
    utilisation: 3.26,
    flag: 'over_subscribed',
  }),
  row({
    courseCode: 'CMP 4410',
    title: 'Compilers',
    capacity: 25,
    expected: 4.2,
    low: 1.9,
    high: 6.5,
    utilisation: 0.168,
    flag: 'at_risk',
  }),
];

// The first render of the charts in jsdom is slow on a busy machine.
const WAIT = { timeout: 8000 };

describe('demand outlook', { timeout: 30_000 }, () => {
  it('shows each flag in words with an icon, not by colour alone', async () => {
    api = installFakeApi({
      'GET /forecasts/about': () => ({ status: 200, data: ABOUT }),
      'GET /forecasts': () => ({ status: 200, data: ROWS }),
    });
    signInAs('department_head');
    renderApp('/outlook');
    const table = await screen.findByRole(
      'table',
      { name: /3 electives offered in 2027-SP/ },
      WAIT,
    );
    const over = within(table).getByText('CMP 1110').closest('tr') as HTMLElement;
    expect(within(over).getByText('Over-subscribed')).toBeInTheDocument();
    expect(over.querySelector('[data-flag="over_subscribed"] svg')).not.toBeNull();
    const risk = within(table).getByText('CMP 4410').closest('tr') as HTMLElement;
    expect(within(risk).getByText('At risk')).toBeInTheDocument();
    expect(within(risk).getByText('1.9 – 6.5')).toBeInTheDocument();
    expect(within(risk).getByText('17 %')).toBeInTheDocument();
    const ok = within(table).getByText('CMP 2110').closest('tr') as HTMLElement;
    expect(within(ok).getByText('Balanced')).toBeInTheDocument();
    // How beta was calibrated, and the cautions, beside the estimates.
    expect(screen.getByText(/lowest WAPE/)).toBeInTheDocument();
    expect(screen.getByRole('heading', { name: 'About these estimates' })).toBeInTheDocument();
  });

  it('lets the head set the at-risk threshold', async () => {
    api = installFakeApi({
      'GET /forecasts/about': () => ({ status: 200, data: ABOUT }),
      'GET /forecasts': () => ({ status: 200, data: ROWS }),
    });
    signInAs('department_head');
    renderApp('/outlook');
    const input = await screen.findByLabelText('At risk below (students)', {}, WAIT);
    await userEvent.clear(input);
    await userEvent.type(input, '15');
    expect(input).toHaveValue(15);
  });

  it('says what the registrar must import when the term has no offerings', async () => {
    api = installFakeApi({
      'GET /forecasts/about': () => ({
        status: 200,
        data: { ...ABOUT, offerings: 0, run: null, betaMethod: null },
      }),
    });
    signInAs('department_head');
    renderApp('/outlook');
    expect(
      await screen.findByRole('heading', { name: 'No offerings imported for 2027-SP' }, WAIT),
    ).toBeInTheDocument();
    expect(screen.getByText(/must first import the offerings file for/)).toBeInTheDocument();
    expect(screen.queryByRole('button', { name: 'Export CSV' })).toBeNull();
  });

  it('shows the backtest honestly when the naive forecast wins', async () => {
    const backtest: BacktestResponse = {
      term: '2026-FA',
      modelWape: 0.31,
      naiveWape: 0.22,
      beta: 0.08,
      betaMethod: 'Beta chosen on 2026-SP.',
      courses: [
        {
          courseCode: 'CMP 2110',
          title: 'Data Structures',
          department: 'CMP',
          forecast: 29.1,
          low: 22.8,
          high: 35.3,
          actual: 47,
          naive: 38,
          naiveTerm: '2026-SP',
          modelError: 0.38,
          naiveError: 0.19,
        },
      ],
    };
    expect(backtestVerdict(backtest)).toMatch(/naive forecast .* was closer than the model's/);
    api = installFakeApi({
      'GET /forecasts/about': () => ({ status: 200, data: ABOUT }),
      'GET /forecasts': () => ({ status: 200, data: ROWS }),
      'GET /forecasts/backtest': () => ({ status: 200, data: backtest }),
    });
    signInAs('department_head');
    renderApp('/outlook');
    await userEvent.click(await screen.findByRole('tab', { name: 'Backtest' }, WAIT));
    const table = await screen.findByRole('table', { name: /Backtest of 2026-FA/ }, WAIT);
    expect(within(table).getByText('47')).toBeInTheDocument();
    expect(screen.getByText('31.0 %')).toBeInTheDocument();
    expect(screen.getByText('22.0 %')).toBeInTheDocument();
  });
});
