import { describe, expect, it, vi } from 'vitest';
import { render, screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type { EvaluationDetail, EvaluationResult } from '@kinpath/contracts';
import { DEFAULT_MODEL_SETTINGS } from '@kinpath/contracts';
import { BacktestResults } from './components/BacktestResults';

const result = (
  name: string,
  mae: number,
  rmse: number,
  extra: Partial<EvaluationResult> = {},
): EvaluationResult => ({
  name,
  signal: 'grade',
  mae,
  rmse,
  coverage: 1,
  n: 3017,
  kind: 'baseline',
  configuration: null,
  baseline: null,
  margin: null,
  ranges: null,
  ...extra,
});

function backtest(results: EvaluationResult[]): EvaluationDetail {
  return {
    id: 'b1',
    status: 'finished',
    progress: 1,
    holdoutTerm: '2026-FA',
    configurations: [
      { ...DEFAULT_MODEL_SETTINGS, name: 'Defaults' },
      { ...DEFAULT_MODEL_SETTINGS, similarity: 'pearson', name: 'Pearson' },
    ],
    settingsVersion: 1,
    dataState: {
      latestImportId: 'i1',
      latestImportAt: '2026-12-01T09:00:00.000Z',
      records: 50874,
      students: 2000,
    },
    createdAt: '2026-12-02T09:00:00.000Z',
    createdBy: 'registrar@halden.example',
    startedAt: null,
    finishedAt: null,
    message: null,
    results,
    byDepartment: [],
  };
}

const configuration = (index: number) => ({ kind: 'configuration' as const, configuration: index });

/** The row of one configuration or baseline in the results table. */
const row = (name: string) => screen.getByTestId(`result-${name}`);

describe('backtest results', () => {
  it('shows each configuration’s margin over the best baseline with its interval, and range coverage', () => {
    render(
      <BacktestResults
        evaluation={backtest([
          result('Defaults', 0.2917, 0.3736, {
            ...configuration(0),
            margin: { baseline: 'dampedBias', mae: 0.0294, low: 0.0241, high: 0.0349 },
            ranges: {
              calibrationTerm: '2026-SP',
              coverage: 0.795,
              meanWidth: 0.9,
              byConfidence: {
                high: { n: 221, coverage: 0.81 },
                medium: { n: 2796, coverage: 0.79 },
                low: { n: 0, coverage: null },
              },
            },
          }),
          result('Damped bias', 0.3211, 0.4042),
        ])}
      />,
    );
    expect(row('Defaults')).toHaveTextContent('+0.029+0.024 to +0.035');
    expect(row('Defaults')).toHaveTextContent('79.5 %high 81.0 %, medium 79.0 %');
    expect(row('Damped bias')).toHaveTextContent('——');
  });

  it('marks the lowest MAE and RMSE in words, and offers a tested configuration as the settings', async () => {
    const onUse = vi.fn();
    render(
      <BacktestResults
        onUse={onUse}
        evaluation={backtest([
          result('Defaults', 0.2956, 0.3787, { ...configuration(0), coverage: 0.994 }),
          result('Pearson', 0.297, 0.3701, { ...configuration(1), coverage: 0.99 }),
          result('Global mean', 0.5439, 0.6678),
          result('Damped bias', 0.3211, 0.4042),
        ])}
      />,
    );
    // The best MAE belongs to Defaults, the best RMSE to Pearson: each says so in words.
    expect(within(row('Defaults')).getByText('lowest MAE')).toBeInTheDocument();
    expect(within(row('Defaults')).queryByText('lowest RMSE')).toBeNull();
    expect(within(row('Pearson')).getByText('lowest RMSE')).toBeInTheDocument();
    expect(within(row('Damped bias')).queryByText(/lowest/)).toBeNull();
    expect(within(row('Defaults')).getByText('99.4 %')).toBeInTheDocument();
    expect(
      screen.getByText(/The best configuration, Defaults, has a grade MAE of 0\.296/),
    ).toBeInTheDocument();
    expect(screen.queryByTestId('baseline-wins')).toBeNull();
    // The chart names every configuration and baseline.
    expect(
      screen.getByText('Grade MAE per configuration (green) and baseline (grey)', { exact: false }),
    ).toBeInTheDocument();

    await userEvent
      .setup()
      .click(screen.getByRole('button', { name: 'Use the settings of Pearson' }));
    expect(onUse).toHaveBeenCalledWith(1);
    expect(within(row('Global mean')).queryByRole('button')).toBeNull();
  });

  it('says honestly when a baseline beats every configuration', () => {
    render(
      <BacktestResults
        evaluation={backtest([
          result('Defaults', 0.575, 0.668, configuration(0)),
          result('Pearson', 0.7375, 0.79, configuration(1)),
          result('Student mean', 0.425, 0.62),
          result('Damped bias', 0.7375, 0.8),
        ])}
      />,
    );
    const note = screen.getByTestId('baseline-wins');
    expect(note).toHaveTextContent(
      'A baseline beats every configuration on grade: Student mean has an MAE of 0.425, the best configuration (Defaults) 0.575.',
    );
    expect(within(row('Student mean')).getByText('lowest MAE')).toBeInTheDocument();
    expect(within(row('Student mean')).getByText('lowest RMSE')).toBeInTheDocument();
    expect(screen.queryByText(/The best configuration,/)).toBeNull();
  });
});
