import { afterEach, describe, expect, it } from 'vitest';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type {
  CreateUserRequest,
  CreateUserResponse,
  DepartmentEntry,
  UserAccount,
} from '@kinpath/contracts';
import { installFakeApi } from '../../test/fake-api';
import { renderApp, signInAs } from '../../test/render';

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const ACCOUNTS: UserAccount[] = [
  {
    id: '1',
    email: 'registrar@halden.example',
    displayName: 'Tobias Fenwright',
    role: 'registrar',
    department: null,
    active: true,
    createdAt: '2026-01-05T09:30:00.000Z',
    updatedAt: '2026-01-05T09:30:00.000Z',
    pendingInvitation: false,
  },
  {
    id: '2',
    email: 'head.cmp@halden.example',
    displayName: 'Ruth Calloway',
    role: 'department_head',
    department: 'CMP',
    active: true,
    createdAt: '2026-01-06T10:00:00.000Z',
    updatedAt: '2026-01-06T10:00:00.000Z',
    pendingInvitation: false,
  },
  {
    id: '3',
    email: 'advisor.old@halden.example',
    displayName: 'Albin Vesterby',
    role: 'advisor',
    department: null,
    active: false,
    createdAt: '2025-08-20T08:15:00.000Z',
    updatedAt: '2025-08-20T08:15:00.000Z',
    pendingInvitation: false,
  },
];

const DEPARTMENTS: DepartmentEntry[] = [
  { code: 'BIO', name: null, courses: 12, added: false, heads: 0 },
  { code: 'CMP', name: null, courses: 14, added: false, heads: 1 },
];

function fakeUsersApi(accounts: UserAccount[]) {
  const store = [...accounts];
  return installFakeApi({
    'GET /users': () => ({ status: 200, data: [...store] }),
    'GET /departments': () => ({ status: 200, data: DEPARTMENTS }),
    'POST /users': ({ body }) => {
      const request = body as CreateUserRequest;
      if (store.some((u) => u.email === request.email)) {
        return { status: 409, data: { statusCode: 409, message: 'Exists', error: 'Conflict' } };
      }
      const created: CreateUserResponse = {
        id: String(store.length + 1),
        email: request.email,
        displayName: request.displayName,
        role: request.role,
        department: request.department ?? null,
        active: true,
        createdAt: '2026-02-01T12:00:00.000Z',
        updatedAt: '2026-02-01T12:00:00.000Z',
        pendingInvitation: false,
        notice: null,
      };
      store.push(created);
      return { status: 201, data: created };
    },
  });
}

const bodyRows = (table: HTMLElement) => within(table).getAllByRole('row').slice(1);
const cellTexts = (row: HTMLElement) =>
  within(row)
    .getAllByRole('cell')
    .map((cell) => cell.textContent)
    // The last cell holds the row's action buttons.
    .slice(0, 6);

// The table renders action buttons per row; a loaded machine needs more than the default 5 s.
describe('users page', { timeout: 20_000 }, () => {
  it('lists the accounts from GET /api/users, sorted by name', async () => {
    api = fakeUsersApi(ACCOUNTS);
    signInAs('admin');
    renderApp('/admin/users');

    const table = await screen.findByRole('table', { name: 'Accounts' });
    const rows = bodyRows(table);
    expect(rows.map(cellTexts)).toEqual([
      ['Albin Vesterby', 'advisor.old@halden.example', 'Advisor', '—', 'Deactivated', '2025-08-20'],
      [
        'Ruth Calloway',
        'head.cmp@halden.example',
        'Department head',
        'CMP',
        'Active',
        '2026-01-06',
      ],
      [
        'Tobias Fenwright',
        'registrar@halden.example',
        'Registrar staff',
        '—',
        'Active',
        '2026-01-05',
      ],
    ]);
    expect(screen.getByText('3 accounts')).toBeInTheDocument();
    expect(api.requests[0]).toMatchObject({
      method: 'GET',
      url: '/users',
      authorization: 'Bearer token-for-admin',
    });
  });

  it('sorts by a column and filters the rows', async () => {
    api = fakeUsersApi(ACCOUNTS);
    signInAs('admin');
    renderApp('/admin/users');
    const table = await screen.findByRole('table', { name: 'Accounts' });
    const user = userEvent.setup();

    await user.click(within(table).getByRole('button', { name: 'Created' }));
    expect(bodyRows(table).map((row) => cellTexts(row)[5])).toEqual([
      '2025-08-20',
      '2026-01-05',
      '2026-01-06',
    ]);
    expect(within(table).getByRole('columnheader', { name: 'Created' })).toHaveAttribute(
      'aria-sort',
      'ascending',
    );

    await user.type(screen.getByLabelText('Filter accounts'), 'calloway');
    expect(bodyRows(table).map((row) => cellTexts(row)[0])).toEqual(['Ruth Calloway']);
    expect(screen.getByText('1 of 3 accounts')).toBeInTheDocument();
  });

  it('checks the new account’s details before sending them', async () => {
    api = fakeUsersApi(ACCOUNTS);
    signInAs('admin');
    renderApp('/admin/users');
    await screen.findByRole('table', { name: 'Accounts' });
    const form = within(screen.getByRole('region', { name: 'Add an account' }));
    const user = userEvent.setup();

    await user.type(form.getByLabelText('Name'), 'Mara Lindqvist');
    await user.type(form.getByLabelText('E-mail'), 'mara@halden.example');
    await user.selectOptions(form.getByLabelText('Role'), 'department_head');
    await user.type(form.getByLabelText('Password'), 'short-pass');
    await user.click(form.getByRole('button', { name: 'Create account' }));

    expect(await form.findByText('Use at least 12 characters.')).toBeInTheDocument();
    expect(form.getByText('Choose the department a head is responsible for.')).toBeInTheDocument();
    expect(api.requests.filter((r) => r.method === 'POST')).toHaveLength(0);
  });

  it('creates an account with POST /api/users and shows it in the table', async () => {
    api = fakeUsersApi(ACCOUNTS);
    signInAs('admin');
    renderApp('/admin/users');
    const table = await screen.findByRole('table', { name: 'Accounts' });
    const form = within(screen.getByRole('region', { name: 'Add an account' }));
    const user = userEvent.setup();

    await user.type(form.getByLabelText('Name'), 'Mara Lindqvist');
    await user.type(form.getByLabelText('E-mail'), 'mara@halden.example');
    await user.selectOptions(form.getByLabelText('Role'), 'department_head');
    const department = form.getByLabelText('Department');
    // A list, not free text: only the catalogue's codes can be chosen.
    await waitFor(() =>
      expect(
        within(department)
          .getAllByRole('option')
          .map((o) => o.textContent),
      ).toEqual(['Choose…', 'BIO', 'CMP']),
    );
    await user.selectOptions(department, 'BIO');
    await user.type(form.getByLabelText('Password'), 'a-long-enough-secret');
    await user.click(form.getByRole('button', { name: 'Create account' }));

    expect(await form.findByRole('status')).toHaveTextContent(
      'Account created for Mara Lindqvist (mara@halden.example).',
    );
    expect(api.requests.find((r) => r.method === 'POST')?.body).toEqual({
      email: 'mara@halden.example',
      displayName: 'Mara Lindqvist',
      role: 'department_head',
      department: 'BIO',
      password: 'a-long-enough-secret',
    });
    await waitFor(() =>
      expect(bodyRows(table).map((row) => cellTexts(row)[0])).toContain('Mara Lindqvist'),
    );
    expect(form.getByLabelText('Name')).toHaveValue('');
  });

  it('sends no department for other roles and reports a taken e-mail', async () => {
    api = fakeUsersApi(ACCOUNTS);
    signInAs('admin');
    renderApp('/admin/users');
    await screen.findByRole('table', { name: 'Accounts' });
    const form = within(screen.getByRole('region', { name: 'Add an account' }));
    const user = userEvent.setup();

    await user.type(form.getByLabelText('Name'), 'Tobias Again');
    await user.type(form.getByLabelText('E-mail'), 'registrar@halden.example');
    await user.selectOptions(form.getByLabelText('Role'), 'registrar');
    await user.type(form.getByLabelText('Password'), 'a-long-enough-secret');
    await user.click(form.getByRole('button', { name: 'Create account' }));

    expect(await form.findByRole('alert')).toHaveTextContent(
      'An account with this e-mail address exists already.',
    );
    expect(api.requests.find((r) => r.method === 'POST')?.body).not.toHaveProperty('department');
  });

  it('tells a pending invitation from a deactivated account in words', async () => {
    api = fakeUsersApi([
      ...ACCOUNTS,
      {
        ...ACCOUNTS[0],
        id: '9',
        email: 'new.advisor@halden.example',
        displayName: 'Yusuf Brandt',
        role: 'advisor',
        active: false,
        pendingInvitation: true,
      },
    ]);
    signInAs('admin');
    renderApp('/admin/users');
    const table = await screen.findByRole('table', { name: 'Accounts' });
    const statuses = Object.fromEntries(
      bodyRows(table).map((row) => [cellTexts(row)[0], cellTexts(row)[4]]),
    );
    expect(statuses).toMatchObject({
      'Yusuf Brandt': 'Invitation pending',
      'Albin Vesterby': 'Deactivated',
      'Ruth Calloway': 'Active',
    });
  });

  it('asks before deactivating, and sends nothing when cancelled', async () => {
    api = installFakeApi({
      'GET /users': () => ({ status: 200, data: [...ACCOUNTS] }),
      'PATCH /users/2': ({ body }) => ({
        status: 200,
        data: { ...ACCOUNTS[1], ...(body as object) },
      }),
    });
    signInAs('admin');
    renderApp('/admin/users');
    await screen.findByRole('table', { name: 'Accounts' });
    const user = userEvent.setup();
    const deactivate = screen.getByRole('button', {
      name: 'Deactivate Ruth Calloway (head.cmp@halden.example)',
    });

    await user.click(deactivate);
    const dialog = await screen.findByRole('dialog', { name: 'Deactivate Ruth Calloway?' });
    expect(dialog).toHaveTextContent('signed out everywhere at once');
    await user.click(within(dialog).getByRole('button', { name: 'Cancel' }));
    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
    expect(api.requests.filter((r) => r.method === 'PATCH')).toHaveLength(0);

    await user.click(deactivate);
    const again = await screen.findByRole('dialog', { name: 'Deactivate Ruth Calloway?' });
    await user.click(within(again).getByRole('button', { name: 'Deactivate' }));
    await waitFor(() =>
      expect(api?.requests.filter((r) => r.method === 'PATCH')).toEqual([
        expect.objectContaining({ url: '/users/2', body: { active: false } }),
      ]),
    );
  });
});

describe('departments on the users page', { timeout: 30_000 }, () => {
  it('checks a new department code before sending it', async () => {
    api = installFakeApi({
      'GET /users': () => ({ status: 200, data: ACCOUNTS }),
      'GET /departments': () => ({ status: 200, data: DEPARTMENTS }),
      'POST /departments': () => ({
        status: 400,
        data: {
          statusCode: 400,
          message: 'Department must be a short upper-case code such as CMP.',
          error: 'Bad Request',
        },
      }),
    });
    signInAs('admin');
    renderApp('/admin/users');
    const section = within(await screen.findByRole('region', { name: 'Departments' }));
    expect(await section.findByRole('cell', { name: 'CMP' })).toBeInTheDocument();
    const user = userEvent.setup();
    await user.type(section.getByLabelText('New department code'), 'x');
    await user.click(section.getByRole('button', { name: 'Add department' }));
    expect(await section.findByText('Use 2 to 6 letters, such as MUS.')).toBeInTheDocument();
    expect(api.requests.filter((r) => r.method === 'POST')).toHaveLength(0);
  });
});
