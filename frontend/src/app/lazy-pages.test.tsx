import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { cleanup, render, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { RouterProvider, createMemoryRouter } from 'react-router';
import type { UserSummary } from '@kinpath/contracts';
import { PageHeader } from '../components/PageHeader';
import { setSession } from '../features/auth/session';
import { installFakeApi } from '../test/fake-api';
import { AppProviders } from './App';
import { createQueryClient } from './query-client';
import { routes } from './routes';

// The catalogue arrives when the test says so; the audit trail's code cannot be fetched; the
// users page fails while rendering.
const catalogue = vi.hoisted(() => {
  let arrive = () => {};
  const arrived = new Promise<void>((resolve) => {
    arrive = resolve;
  });
  return { arrived, arrive: () => arrive() };
});
vi.mock('../features/catalogue/routes/CataloguePage', async () => {
  await catalogue.arrived;
  return { CataloguePage: () => <PageHeader title="Catalogue and terms" /> };
});
vi.mock('../features/audit/routes/AuditPage', () => {
  throw new TypeError('Failed to fetch dynamically imported module');
});
vi.mock('../features/users/routes/UsersPage', () => ({
  UsersPage: () => {
    throw new Error('The page broke while rendering.');
  },
}));

const REGISTRAR: UserSummary = {
  id: 'u-registrar',
  email: 'registrar@halden.example',
  displayName: 'Tobias Fenwright',
  role: 'registrar',
  department: null,
};

function renderAt(path: string, user: UserSummary = REGISTRAR) {
  setSession({ token: `token-for-${user.role}`, user });
  const router = createMemoryRouter(routes, { initialEntries: [path] });
  const client = createQueryClient();
  client.setDefaultOptions({ queries: { retry: false } });
  render(
    <AppProviders queryClient={client}>
      <RouterProvider router={router} />
    </AppProviders>,
  );
  return router;
}

let api: ReturnType<typeof installFakeApi>;
beforeEach(() => {
  api = installFakeApi({
    'GET /terms': () => ({ status: 200, data: { terms: [], current: null, next: null } }),
  });
});
afterEach(() => {
  // Unmounted first, so that a page which loaded late sends nothing past the fake API.
  cleanup();
  api.restore();
});

describe('pages loaded on demand', () => {
  it('shows the shell with a progress bar while the first page loads', async () => {
    renderAt('/registrar');

    expect(screen.getByRole('navigation', { name: 'Main' })).toBeInTheDocument();
    expect(screen.getByRole('progressbar', { name: 'Loading the page' })).toBeInTheDocument();
    expect(await screen.findByRole('heading', { level: 1, name: 'Registrar' })).toBeInTheDocument();
    expect(screen.queryByRole('progressbar', { name: 'Loading the page' })).toBeNull();
  });

  it('keeps the current page, marked busy, until the next one has loaded', async () => {
    const router = renderAt('/registrar');
    await screen.findByRole('heading', { level: 1, name: 'Registrar' });

    const nav = within(screen.getByRole('navigation', { name: 'Main' }));
    await userEvent.setup().click(nav.getByRole('link', { name: 'Catalogue and terms' }));

    expect(await screen.findByRole('progressbar', { name: 'Loading the page' })).toBeVisible();
    expect(screen.getByRole('main')).toHaveAttribute('aria-busy', 'true');
    expect(screen.getByRole('heading', { level: 1, name: 'Registrar' })).toBeInTheDocument();

    catalogue.arrive();
    expect(
      await screen.findByRole('heading', { level: 1, name: 'Catalogue and terms' }),
    ).toBeInTheDocument();
    expect(screen.getByRole('main')).not.toHaveAttribute('aria-busy');
    expect(router.state.location.pathname).toBe('/registrar/catalogue');
  });

  it('offers a reload, inside the shell, when a page cannot be fetched', async () => {
    renderAt('/audit');

    expect(
      await screen.findByRole('heading', { level: 1, name: 'This page could not be loaded' }),
    ).toBeInTheDocument();
    expect(screen.getByRole('button', { name: 'Reload the page' })).toBeInTheDocument();
    expect(screen.getByRole('navigation', { name: 'Main' })).toBeInTheDocument();
    await waitFor(() => expect(document.title).toBe('This page could not be loaded · Kinpath'));
  });

  it('leaves other failures to the app’s error page', async () => {
    // React reports the caught error on the console; the page below is what counts.
    const quiet = vi.spyOn(console, 'error').mockImplementation(() => {});
    renderAt('/admin/users', { ...REGISTRAR, id: 'u-admin', role: 'admin' });

    expect(
      await screen.findByRole('heading', { level: 1, name: 'Something went wrong' }),
    ).toBeInTheDocument();
    expect(screen.getByText('Details: The page broke while rendering.')).toBeInTheDocument();
    expect(screen.queryByRole('navigation', { name: 'Main' })).toBeNull();
    quiet.mockRestore();
  });
});
