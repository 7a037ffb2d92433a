import { afterEach, describe, expect, it } from 'vitest';
import { screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type { ModelSettingsVersion } from '@kinpath/contracts';
import { DEFAULT_MODEL_SETTINGS } from '@kinpath/contracts';
import { installFakeApi } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const V1: ModelSettingsVersion = {
  version: 1,
  settings: DEFAULT_MODEL_SETTINGS,
  createdAt: '2026-12-01T09:00:00.000Z',
  createdBy: null,
  note: 'The defaults of the method description.',
  restoredFrom: null,
};

describe('the model settings form', { timeout: 40_000 }, () => {
  it('explains each control, refuses values out of range, and saves a change as a new version', async () => {
    api = installFakeApi({
      'GET /model/settings': () => ({ status: 200, data: V1 }),
      'GET /model/settings/versions': () => ({ status: 200, data: [V1] }),
      'PUT /model/settings': ({ body }) => {
        const { note, ...settings } = body as typeof DEFAULT_MODEL_SETTINGS & { note?: string };
        return {
          status: 200,
          data: {
            ...V1,
            version: 2,
            settings,
            note: note ?? null,
            createdBy: 'registrar@halden.example',
          },
        };
      },
    });
    signInAs('registrar');
    renderApp('/registrar/model');
    const form = within(await screen.findByRole('form', { name: 'Model settings' }));
    const user = userEvent.setup();
    expect(form.getByText(/courses nearly everyone took/i)).toBeInTheDocument();
    expect(form.getByText(/satisfaction counts for the rest/i)).toBeInTheDocument();

    const k = form.getByLabelText('k (kin per course)');
    await user.clear(k);
    await user.type(k, '3');
    await user.click(form.getByRole('button', { name: 'Save settings' }));
    expect(await form.findByText('Minimum kin cannot be larger than k (3).')).toBeInTheDocument();
    expect(api.requests.filter((r) => r.method === 'PUT')).toHaveLength(0);

    await user.type(k, '5');
    await user.type(form.getByLabelText('Why the change (optional)'), 'Wider kin');
    await user.click(form.getByRole('button', { name: 'Save settings' }));
    expect(await form.findByText(/Saved as version 2/)).toBeInTheDocument();
    expect(api.requests.find((r) => r.method === 'PUT')?.body).toEqual({
      ...DEFAULT_MODEL_SETTINGS,
      k: 35,
      note: 'Wider kin',
    });
  });
});

describe('the backtest page', { timeout: 40_000 }, () => {
  const TERMS = {
    terms: [
      { term: '2026-SP', records: 4193, offerings: 100 },
      { term: '2026-FA', records: 4206, offerings: 100 },
    ],
    current: '2026-FA',
    next: '2027-SP',
  };
  const DETAIL = {
    id: 'b7',
    status: 'finished',
    progress: 1,
    holdoutTerm: '2026-FA',
    configurations: [{ ...DEFAULT_MODEL_SETTINGS, name: 'Current settings (version 1)' }],
    settingsVersion: 1,
    dataState: { latestImportId: null, latestImportAt: null, records: 50874, students: 2000 },
    createdAt: '2026-12-02T09:00:00.000Z',
    createdBy: 'registrar@halden.example',
    startedAt: null,
    finishedAt: '2026-12-02T09:01:00.000Z',
    message: null,
    results: [],
    byDepartment: [],
  };

  it('shows the latest backtest without opening it, and a variant starts from the settings in force', async () => {
    api = installFakeApi({
      'GET /model/settings': () => ({ status: 200, data: V1 }),
      'GET /terms': () => ({ status: 200, data: TERMS }),
      'GET /model/evaluations': () => ({ status: 200, data: [DETAIL] }),
      'GET /model/evaluations/b7': () => ({ status: 200, data: DETAIL }),
    });
    signInAs('registrar');
    renderApp('/registrar/backtests');
    await screen.findByRole('form', { name: 'New backtest' });
    // The list, then the latest backtest itself, load one after the other.
    expect(
      await screen.findByRole('heading', { name: 'Results for 2026-FA' }, { timeout: 10_000 }),
    ).toBeInTheDocument();

    const form = within(await screen.findByRole('form', { name: 'New backtest' }));
    const user = userEvent.setup();
    const k = form.getByLabelText('k (kin per course)', { exact: false });
    await user.clear(k);
    await user.type(k, '12');
    await user.click(form.getByRole('button', { name: 'Add a variant' }));
    expect(form.getByLabelText('k (kin per course), configuration 2')).toHaveValue(
      String(DEFAULT_MODEL_SETTINGS.k),
    );
  });
});
