import { afterEach, describe, expect, it } from 'vitest';
import { screen, waitFor } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { getSession } from './session';
import { DEMO_USERS, renderApp } from '../../test/render';
import { installFakeApi } from '../../test/fake-api';

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

async function fillAndSubmit(email: string, password: string) {
  const user = userEvent.setup();
  if (email) await user.type(screen.getByLabelText('E-mail'), email);
  if (password) await user.type(screen.getByLabelText('Password'), password);
  await user.click(screen.getByRole('button', { name: 'Sign in' }));
}

describe('sign-in page', () => {
  it('has one h1, labelled fields and its own title', async () => {
    renderApp('/sign-in');
    expect(screen.getAllByRole('heading', { level: 1 })).toHaveLength(1);
    expect(screen.getByRole('heading', { level: 1, name: 'Sign in' })).toBeInTheDocument();
    expect(screen.getByLabelText('E-mail')).toHaveAttribute('type', 'email');
    expect(screen.getByLabelText('Password')).toHaveAttribute('type', 'password');
    expect(screen.getByRole('main')).toBeInTheDocument();
    await waitFor(() => expect(document.title).toBe('Sign in · Kinpath'));
  });

  it('announces missing fields and sends nothing', async () => {
    api = installFakeApi({});
    renderApp('/sign-in');
    await fillAndSubmit('', '');

    const alerts = await screen.findAllByRole('alert');
    expect(alerts.map((alert) => alert.textContent)).toEqual([
      'Enter your e-mail address.',
      'Enter your password.',
    ]);
    expect(screen.getByLabelText('E-mail')).toHaveAttribute('aria-invalid', 'true');
    expect(screen.getByLabelText('E-mail')).toHaveFocus();
    expect(api.requests).toHaveLength(0);
  });

  it('refuses an incomplete e-mail address', async () => {
    api = installFakeApi({});
    renderApp('/sign-in');
    await fillAndSubmit('advisor@halden', 'kinpath-demo-2026');

    expect(await screen.findByRole('alert')).toHaveTextContent('Enter a complete e-mail address');
    expect(api.requests).toHaveLength(0);
  });

  it('announces a refused sign-in with the same words for any wrong detail', async () => {
    api = installFakeApi({
      'POST /auth/login': () => ({
        status: 401,
        data: { statusCode: 401, message: 'Invalid credentials', error: 'Unauthorized' },
      }),
    });
    renderApp('/sign-in');
    await fillAndSubmit('advisor@halden.example', 'not-the-password');

    expect(await screen.findByRole('alert')).toHaveTextContent(
      'E-mail or password is not correct.',
    );
    expect(api.requests).toEqual([
      expect.objectContaining({
        method: 'POST',
        url: '/auth/login',
        body: { email: 'advisor@halden.example', password: 'not-the-password' },
      }),
    ]);
    expect(getSession()).toBeNull();
    expect(screen.getByRole('heading', { level: 1, name: 'Sign in' })).toBeInTheDocument();

    // Emptied fields on the next try: only the field messages remain.
    const user = userEvent.setup();
    await user.clear(screen.getByLabelText('E-mail'));
    await user.clear(screen.getByLabelText('Password'));
    await user.click(screen.getByRole('button', { name: 'Sign in' }));
    await waitFor(() =>
      expect(screen.getAllByRole('alert').map((alert) => alert.textContent)).toEqual([
        'Enter your e-mail address.',
        'Enter your password.',
      ]),
    );
  });

  it('tells a deactivated person, in the server’s words, that the account is not active', async () => {
    const message =
      'Your Kinpath account is not active. Ask a Kinpath administrator (admin@halden.example) to reactivate it.';
    api = installFakeApi({
      'POST /auth/login': () => ({
        status: 403,
        data: { statusCode: 403, message, error: 'Forbidden' },
      }),
    });
    renderApp('/sign-in');
    await fillAndSubmit('advisor@halden.example', 'kinpath-demo-2026');
    expect(await screen.findByRole('alert')).toHaveTextContent(message);
    expect(getSession()).toBeNull();
  });

  it('signs in, keeps the session for the tab and opens the role’s landing page', async () => {
    api = installFakeApi({
      'POST /auth/login': () => ({
        status: 200,
        data: { accessToken: 'jwt-advisor', user: DEMO_USERS.advisor },
      }),
      'GET /terms': () => ({ status: 200, data: { terms: [], current: null, next: null } }),
    });
    const { router } = renderApp('/sign-in');
    await fillAndSubmit('  advisor@halden.example ', 'kinpath-demo-2026');

    expect(await screen.findByRole('heading', { level: 1, name: 'Advising' })).toBeInTheDocument();
    expect(router.state.location.pathname).toBe('/advising');
    expect(getSession()?.token).toBe('jwt-advisor');
    expect(JSON.parse(window.sessionStorage.getItem('kinpath.session') ?? 'null')).toMatchObject({
      token: 'jwt-advisor',
      user: { role: 'advisor' },
    });
    // The first read after sign-in carries the new token.
    await waitFor(() =>
      expect(api?.requests.find((r) => r.url === '/terms')?.authorization).toBe(
        'Bearer jwt-advisor',
      ),
    );
  });
});
