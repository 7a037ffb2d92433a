import { afterEach, describe, expect, it } from 'vitest';
import { configure, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type { AuditPage } from '@kinpath/contracts';
import { installFakeApi } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';

configure({ asyncUtilTimeout: 8000 });

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const PAGE: AuditPage = {
  items: [
    {
      id: '2',
      at: '2026-11-02T09:15:04.000Z',
      actorId: 'a1',
      actorEmail: 'admin@halden.example',
      action: 'auth.sign_in',
      target: '5e60d7b8-8091-4e17-9a83-623791c47334',
      targetLabel: 'admin@halden.example',
      detail: { address: '127.0.0.1' },
    },
    {
      id: '1',
      at: '2026-11-01T07:00:00.000Z',
      actorId: null,
      actorEmail: null,
      action: 'import.committed',
      target: 'ce671185-67d0-401f-9aca-c8380ebbf4ba',
      targetLabel: 'records.csv',
      detail: { kind: 'records', inserted: 50874 },
    },
  ],
  total: 2,
  page: 1,
  pageSize: 50,
  actions: ['auth.sign_in', 'import.committed'],
};

describe('the audit trail page', { timeout: 30_000 }, () => {
  it('shows actions in words and targets by name, and filters by target', async () => {
    api = installFakeApi({ 'GET /audit': () => ({ status: 200, data: PAGE }) });
    signInAs('admin');
    renderApp('/audit');
    const table = await screen.findByRole('table', { name: 'Entries' });
    await waitFor(() => expect(within(table).getAllByRole('row')).toHaveLength(3));
    const [, first, second] = within(table).getAllByRole('row');
    const cells = (row: HTMLElement) =>
      within(row)
        .getAllByRole('cell')
        .map((c) => c.textContent);
    expect(cells(first)).toEqual([
      '2026-11-02 09:15:04',
      'admin@halden.example',
      'Signed in',
      'admin@halden.example',
      'address: 127.0.0.1',
    ]);
    expect(cells(second).slice(1, 4)).toEqual(['system', 'Import committed', 'records.csv']);
    const action = screen.getByLabelText('Action');
    expect(
      within(action)
        .getAllByRole('option')
        .map((o) => o.textContent),
    ).toEqual(['Every action', 'Signed in', 'Import committed']);

    const user = userEvent.setup();
    await user.type(screen.getByLabelText('Target contains'), 'records.csv');
    await user.click(screen.getByRole('button', { name: 'Apply filters' }));
    await waitFor(() =>
      expect(api?.requests.at(-1)?.params).toMatchObject({ target: 'records.csv', page: 1 }),
    );
  });
});
