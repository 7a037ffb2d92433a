import { afterEach, describe, expect, it } from 'vitest';
import { screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type {
  BacktestResponse,
  CourseForecast,
  ForecastAbout,
  OutlookRunSummary,
} from '@kinpath/contracts';
import { ESTIMATE_CAUTIONS, OUTLOOK_CAUTIONS } from '@kinpath/contracts';
import { installFakeApi } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';
import { backtestCsv } from './components/BacktestSection';

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const RUN: OutlookRunSummary = {
  id: 'run-1',
  term: '2027-SP',
  reason: 'start',
  status: 'done',
  stepsDone: 7,
  stepsTotal: 7,
  progress: 1,
  students: 901,
  error: null,
  createdAt: '2026-12-01T10:00:00.000Z',
  finishedAt: '2026-12-01T10:01:00.000Z',
};

const ABOUT: ForecastAbout = {
  term: '2027-SP',
  offerings: 98,
  run: RUN,
  pending: null,
  drivers:
    'Programme and year of study against the course level matter most; prerequisites are rarely waived.',
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
  noHistory: false,
  classProfile: null,
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
  row({
    courseCode: 'CMP 4510',
    title: 'Quantum Programming',
    capacity: 20,
    expected: 3.1,
    low: 0,
    high: 7.2,
    utilisation: 0.155,
    flag: 'no_history',
    noHistory: true,
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
      { name: /4 electives offered in 2027-SP/ },
      WAIT,
    );
    const over = within(table).getByText('CMP 1110').closest('tr') as HTMLElement;
    expect(within(over).getByText('Over-subscribed')).toBeInTheDocument();
    expect(over.querySelector('[data-flag="over_subscribed"] svg')).not.toBeNull();
    const risk = within(table).getByText('CMP 4410').closest('tr') as HTMLElement;
    expect(within(risk).getByText('At risk')).toBeInTheDocument();
    expect(within(risk).getByText('1.9 – 6.5')).toBeInTheDocument();
    expect(within(risk).getByText('16.8 %')).toBeInTheDocument();
    const ok = within(table).getByText('CMP 2110').closest('tr') as HTMLElement;
    expect(within(ok).getByText('Balanced')).toBeInTheDocument();
    // A new elective with a small estimate is "no history", not "at risk".
    const fresh = within(table).getByText('CMP 4510').closest('tr') as HTMLElement;
    expect(within(fresh).getByText('No history')).toBeInTheDocument();
    expect(within(fresh).queryByText('At risk')).toBeNull();
    // One plain explanation of what drives demand, the totals, and the head's own cautions.
    expect(screen.getByText(/prerequisites are rarely waived/)).toBeInTheDocument();
    const totals = screen.getByRole('table', { name: 'Department totals' });
    expect(within(totals).getByText('100')).toBeInTheDocument();
    expect(screen.getByRole('heading', { name: 'About these estimates' })).toBeInTheDocument();
    expect(screen.getByText(OUTLOOK_CAUTIONS[0])).toBeInTheDocument();
    expect(screen.queryByText(ESTIMATE_CAUTIONS[0])).toBeNull();
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
        data: { ...ABOUT, offerings: 0, run: null, drivers: null },
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

  it('shows an empty state for a department with no electives', async () => {
    api = installFakeApi({
      'GET /forecasts/about': () => ({ status: 200, data: ABOUT }),
      'GET /forecasts': () => ({ status: 200, data: [] }),
    });
    signInAs('department_head');
    renderApp('/outlook');
    expect(
      await screen.findByRole('heading', { name: /No electives offered/ }, WAIT),
    ).toBeInTheDocument();
  });

  it('shows "All departments" in the registrar’s department selector', async () => {
    api = installFakeApi({
      'GET /forecasts/about': () => ({ status: 200, data: ABOUT }),
      'GET /forecasts': () => ({ status: 200, data: ROWS }),
      'GET /forecasts/runs': () => ({ status: 200, data: [RUN] }),
    });
    signInAs('registrar');
    renderApp('/outlook');
    const select = await screen.findByRole('combobox', { name: 'Department' }, WAIT);
    expect(select).toHaveTextContent('All departments');
  });

  it('shows every backtest term and says so when the model does not win', async () => {
    const backtest: BacktestResponse = {
      terms: [
        {
          term: '2026-SP',
          modelWape: 0.3,
          naiveWape: 0.25,
          sameTermWape: 0.4,
          takeUpWape: 0.27,
          coverage: 0.7,
        },
        {
          term: '2026-FA',
          modelWape: 0.31,
          naiveWape: 0.22,
          sameTermWape: 0.35,
          takeUpWape: 0.24,
          coverage: 0.8,
        },
      ],
      term: '2026-FA',
      modelWape: 0.31,
      naiveWape: 0.22,
      sameTermWape: 0.35,
      takeUpWape: 0.24,
      coverage: 1,
      verdict:
        'Over the last 2 completed terms the model did not beat the naive forecast (enrolment the last time each elective ran): its mean WAPE was 30.5 % against 23.5 %, so weigh its figures accordingly.',
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
          sameTerm: 40,
          takeUp: 31.2,
          noHistory: false,
          modelError: 0.38,
          naiveError: 0.19,
          inside: false,
        },
      ],
    };
    expect(backtestCsv(backtest).split('\r\n')[1]).toBe(
      '2026-FA,CMP 2110,Data Structures,CMP,47,29.1,22.8,35.3,no,38,2026-SP,40,31.2,no',
    );
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
    const terms = screen.getByRole('table', { name: /WAPE per backtest term/ });
    expect(within(terms).getByText('2026-SP')).toBeInTheDocument();
    expect(within(terms).getByText('31.0 %')).toBeInTheDocument();
    expect(within(terms).getByText('22.0 %')).toBeInTheDocument();
    expect(screen.getByText(/did not beat the naive forecast/)).toBeInTheDocument();
  });
});
