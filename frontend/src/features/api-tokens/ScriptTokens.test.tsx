import { afterEach, describe, expect, it, vi } from 'vitest';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type {
  ApiTokenSummary,
  CreateApiTokenRequest,
  CreatedApiToken,
  UserAccount,
} from '@kinpath/contracts';
import { installFakeApi } from '../../test/fake-api';
import { DEMO_USERS, renderApp, signInAs } from '../../test/render';
import { dayFromToday } from './components/CreateTokenForm';

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => {
  api?.restore();
  vi.restoreAllMocks();
});

const NIGHTLY: ApiTokenSummary = {
  id: 't1',
  name: 'Student information system, nightly',
  scopes: ['imports:write', 'imports:read'],
  ownerId: DEMO_USERS.registrar.id,
  ownerEmail: DEMO_USERS.registrar.email,
  createdAt: '2026-09-01T08:00:00.000Z',
  expiresAt: '2026-12-01T00:00:00.000Z',
  lastUsedAt: '2026-11-20T02:10:00.000Z',
  revokedAt: null,
  state: 'active',
};
const SECRET = 'kp_' + 'Qm9yZWFsLWhhcmJvdXItbGFudGVybi1zZWNyZXQtMDE';

function fakeTokensApi(tokens: ApiTokenSummary[], accounts: UserAccount[] = []) {
  const store = [...tokens];
  return installFakeApi({
    'GET /api-tokens': () => ({ status: 200, data: [...store] }),
    'GET /users': () => ({ status: 200, data: accounts }),
    'POST /api-tokens': ({ body }) => {
      const request = body as CreateApiTokenRequest;
      const token: ApiTokenSummary = {
        ...NIGHTLY,
        id: `t${store.length + 1}`,
        name: request.name,
        scopes: request.scopes,
        lastUsedAt: null,
      };
      store.unshift(token);
      const created: CreatedApiToken = { token, secret: SECRET };
      return { status: 201, data: created };
    },
    'POST /api-tokens/t1/revoke': () => {
      store[store.findIndex((t) => t.id === 't1')] = {
        ...NIGHTLY,
        state: 'revoked',
        revokedAt: '2026-11-21T09:00:00.000Z',
      };
      return { status: 200, data: store[0] };
    },
  });
}

const bodyRows = (table: HTMLElement) => within(table).getAllByRole('row').slice(1);

describe('script tokens page', { timeout: 20_000 }, () => {
  it('lists the registrar’s own tokens with created, last day and last use', async () => {
    api = fakeTokensApi([NIGHTLY]);
    signInAs('registrar');
    renderApp('/script-tokens');
    const table = await screen.findByRole('table', { name: 'Your script tokens' });
    const cells = within(bodyRows(table)[0])
      .getAllByRole('cell')
      .map((cell) => cell.textContent);
    expect(cells.slice(0, 7)).toEqual([
      'Student information system, nightly',
      'registrar@halden.example',
      'imports:write, imports:read',
      '2026-09-01',
      '2026-11-30',
      '2026-11-20',
      'Active',
    ]);
    expect(screen.getByRole('link', { name: 'Script tokens' })).toHaveAttribute(
      'aria-current',
      'page',
    );
  });

  it('says so when there is no token', async () => {
    api = fakeTokensApi([]);
    signInAs('registrar');
    renderApp('/script-tokens');
    expect(await screen.findByText(/No script tokens yet/)).toBeInTheDocument();
  });

  it('refuses a form without name or scope, then creates and shows the secret once', async () => {
    api = fakeTokensApi([]);
    signInAs('registrar');
    renderApp('/script-tokens');
    await screen.findByText(/No script tokens yet/);
    const user = userEvent.setup();
    const writeText = vi.fn().mockResolvedValue(undefined);
    Object.defineProperty(navigator, 'clipboard', { value: { writeText }, configurable: true });

    await user.click(screen.getByRole('button', { name: 'Create token' }));
    expect(await screen.findByText('Enter a name for the token.')).toBeInTheDocument();
    expect(screen.getByText('Choose at least one scope.')).toBeInTheDocument();
    expect(api.requests.some((r) => r.method === 'POST')).toBe(false);

    expect(screen.getByLabelText('Last day it works')).toHaveValue(dayFromToday(90));
    await user.type(screen.getByRole('textbox', { name: 'Name' }), 'Nightly upload');
    await user.click(screen.getByRole('checkbox', { name: /imports:write/ }));
    await user.click(screen.getByRole('checkbox', { name: /imports:read/ }));
    await user.click(screen.getByRole('button', { name: 'Create token' }));

    const dialog = await screen.findByRole('dialog', {
      name: /Copy the secret of “Nightly upload”/,
    });
    expect(within(dialog).getByRole('textbox', { name: 'Secret' })).toHaveValue(SECRET);
    expect(within(dialog).getByText(/only time Kinpath shows this secret/)).toBeInTheDocument();
    expect(api.requests.find((r) => r.method === 'POST')?.body).toEqual({
      name: 'Nightly upload',
      scopes: ['imports:write', 'imports:read'],
      expiresOn: dayFromToday(90),
    });
    await user.click(within(dialog).getByRole('button', { name: 'Copy secret' }));
    expect(writeText).toHaveBeenCalledWith(SECRET);
    expect(await within(dialog).findByText('The secret is on the clipboard.')).toBeInTheDocument();

    await user.click(within(dialog).getByRole('button', { name: 'I have stored it' }));
    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
    expect(document.body.textContent).not.toContain(SECRET);
    const table = screen.getByRole('table', { name: 'Your script tokens' });
    expect(await within(table).findByRole('cell', { name: 'Nightly upload' })).toBeInTheDocument();
  });

  it('revokes a token after asking', async () => {
    api = fakeTokensApi([NIGHTLY]);
    signInAs('registrar');
    renderApp('/script-tokens');
    const table = await screen.findByRole('table', { name: 'Your script tokens' });
    const user = userEvent.setup();
    await user.click(within(table).getByRole('button', { name: /Revoke/ }));
    const dialog = await screen.findByRole('dialog', { name: /Revoke “Student information/ });
    expect(api.requests.some((r) => r.url.endsWith('/revoke'))).toBe(false);
    await user.click(within(dialog).getByRole('button', { name: 'Revoke token' }));
    expect(await screen.findByText(/is revoked; scripts using it are refused/)).toBeInTheDocument();
    expect(await within(table).findByText('Revoked')).toBeInTheDocument();
    expect(within(table).queryByRole('button', { name: /Revoke/ })).toBeNull();
  });

  it('lets an admin choose whose role the token acts with', async () => {
    const accounts = [
      { ...DEMO_USERS.registrar, active: true, department: null },
      { ...DEMO_USERS.advisor, active: true, department: null },
    ] as unknown as UserAccount[];
    api = fakeTokensApi([NIGHTLY], accounts);
    signInAs('admin');
    renderApp('/script-tokens');
    await screen.findByRole('table', { name: 'All script tokens' });
    const user = userEvent.setup();
    const owner = screen.getByRole('combobox', { name: 'Acts as' });
    await waitFor(() =>
      expect(
        within(owner)
          .getAllByRole('option')
          .map((o) => o.textContent),
      ).toEqual([expect.stringContaining(DEMO_USERS.registrar.email), 'Yourself']),
    );
    await user.selectOptions(owner, DEMO_USERS.registrar.id);
    await user.type(screen.getByRole('textbox', { name: 'Name' }), 'Outlook export');
    await user.click(screen.getByRole('checkbox', { name: /forecasts:read/ }));
    await user.click(screen.getByRole('button', { name: 'Create token' }));
    await screen.findByRole('dialog');
    expect(api.requests.find((r) => r.method === 'POST')?.body).toMatchObject({
      ownerId: DEMO_USERS.registrar.id,
      scopes: ['forecasts:read'],
    });
  });
});
