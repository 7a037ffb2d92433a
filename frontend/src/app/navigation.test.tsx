import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import type { Role } from '@kinpath/contracts';
import { getSession } from '../features/auth/session';
import { installFakeApi } from '../test/fake-api';
import { renderApp, signInAs } from '../test/render';

let api: ReturnType<typeof installFakeApi>;
beforeEach(() => {
  api = installFakeApi({
    'GET /terms': () => ({ status: 200, data: { terms: [], current: null, next: null } }),
    'GET /users': () => ({ status: 200, data: [] }),
  });
});
afterEach(() => api.restore());

const mainNavigation = () => screen.getByRole('navigation', { name: 'Main' });
const navLinks = () =>
  within(mainNavigation())
    .getAllByRole('link')
    .map((link) => link.textContent);

describe('role navigation', () => {
  it('shows an advisor only the advising pages', async () => {
    signInAs('advisor');
    renderApp('/advising');
    await screen.findByRole('heading', { level: 1, name: 'Advising' });

    expect(navLinks()).toEqual(['Student lookup']);
    expect(screen.queryByRole('link', { name: /import|registrar|users|outlook/i })).toBeNull();
  });

  it('shows registrar staff their pages, student lookup among them (the API allows it)', async () => {
    signInAs('registrar');
    renderApp('/registrar');
    await screen.findByRole('heading', { level: 1, name: 'Registrar' });

    expect(navLinks()).toEqual([
      'Registrar overview',
      'Imports',
      'Catalogue and terms',
      'Grade scale',
      'Model settings',
      'Backtests',
      'Demand outlook',
      'Audit trail',
      'Student lookup',
      'Script tokens',
    ]);
  });

  it('marks the current page in the navigation', async () => {
    signInAs('registrar');
    renderApp('/registrar');
    await screen.findByRole('heading', { level: 1, name: 'Registrar' });
    expect(
      within(mainNavigation()).getByRole('link', { name: 'Registrar overview' }),
    ).toHaveAttribute('aria-current', 'page');
  });

  it.each<[Role, string, string]>([
    ['advisor', '/advising', 'Advising'],
    ['registrar', '/registrar', 'Registrar'],
    ['department_head', '/outlook', 'Demand outlook'],
    ['admin', '/admin/users', 'Users'],
  ])('sends %s from / to %s', async (role, path, heading) => {
    const user = signInAs(role);
    const { router } = renderApp('/');

    expect(await screen.findByRole('heading', { level: 1, name: heading })).toBeInTheDocument();
    expect(router.state.location.pathname).toBe(path);
    expect(screen.getAllByRole('heading', { level: 1 })).toHaveLength(1);
    const banner = screen.getByRole('banner');
    expect(within(banner).getByText(user.displayName)).toBeInTheDocument();
    expect(within(banner).getByRole('button', { name: 'Sign out' })).toBeInTheDocument();
    expect(screen.getByRole('main')).toContainElement(screen.getByRole('heading', { level: 1 }));
    expect(screen.getByRole('link', { name: 'Skip to main content' })).toHaveAttribute(
      'href',
      '#main-content',
    );
    await waitFor(() => expect(document.title).toBe(`${heading} · Kinpath`));
  });

  it('names the department of a department head', async () => {
    signInAs('department_head');
    renderApp('/outlook');
    expect(await screen.findByText(/electives of department CMP/)).toBeInTheDocument();
    expect(
      within(screen.getByRole('banner')).getByText('Department head · CMP'),
    ).toBeInTheDocument();
  });
});

describe('pages a role may not open', () => {
  it('tells an advisor the registrar page is not for their role, with a way home', async () => {
    signInAs('advisor');
    renderApp('/registrar');

    expect(
      await screen.findByRole('heading', { level: 1, name: 'Not available for your role' }),
    ).toBeInTheDocument();
    expect(screen.getByText(/This page is for registrar staff\./)).toBeInTheDocument();
    expect(screen.queryByRole('heading', { name: 'Registrar' })).toBeNull();
    expect(screen.getByRole('link', { name: 'Go to your home page' })).toHaveAttribute(
      'href',
      '/advising',
    );
    expect(navLinks()).toEqual(['Student lookup']);
    // No registrar data is asked for on the advisor's behalf.
    expect(api.requests.map((r) => r.url)).not.toContain('/imports');
  });

  it('keeps the users page from a department head', async () => {
    signInAs('department_head');
    renderApp('/admin/users');
    expect(
      await screen.findByRole('heading', { level: 1, name: 'Not available for your role' }),
    ).toBeInTheDocument();
    expect(api.requests.map((r) => r.url)).not.toContain('/users');
  });

  it('shows a not-found page for an unknown path', async () => {
    signInAs('advisor');
    renderApp('/no/such/page');
    expect(
      await screen.findByRole('heading', { level: 1, name: 'Page not found' }),
    ).toBeInTheDocument();
    expect(screen.getByText('/no/such/page')).toBeInTheDocument();
    expect(screen.getByRole('link', { name: 'Go to your home page' })).toHaveAttribute(
      'href',
      '/advising',
    );
  });

  it('sends a signed-out visitor to sign-in and back to the page afterwards', async () => {
    api.restore();
    api = installFakeApi({
      'POST /auth/login': () => ({
        status: 200,
        data: {
          accessToken: 'jwt-head',
          user: {
            id: 'u-head',
            email: 'head.cmp@halden.example',
            displayName: 'Ruth Calloway',
            role: 'department_head',
            department: 'CMP',
          },
        },
      }),
      'GET /terms': () => ({ status: 200, data: { terms: [], current: null, next: null } }),
    });
    const { router } = renderApp('/outlook');
    expect(await screen.findByRole('heading', { level: 1, name: 'Sign in' })).toBeInTheDocument();

    const user = userEvent.setup();
    await user.type(screen.getByLabelText('E-mail'), 'head.cmp@halden.example');
    await user.type(screen.getByLabelText('Password'), 'kinpath-demo-2026');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));

    expect(
      await screen.findByRole('heading', { level: 1, name: 'Demand outlook' }),
    ).toBeInTheDocument();
    expect(router.state.location.pathname).toBe('/outlook');
  });

  it('signs out from the top bar', async () => {
    signInAs('admin');
    const { router } = renderApp('/admin/users');
    await screen.findByRole('heading', { level: 1, name: 'Users' });

    await userEvent.setup().click(screen.getByRole('button', { name: 'Sign out' }));

    expect(await screen.findByRole('heading', { level: 1, name: 'Sign in' })).toBeInTheDocument();
    expect(router.state.location.pathname).toBe('/sign-in');
    expect(getSession()).toBeNull();
    expect(window.sessionStorage.getItem('kinpath.session')).toBeNull();
  });
});
