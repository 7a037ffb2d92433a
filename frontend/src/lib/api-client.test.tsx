import { afterEach, describe, expect, it } from 'vitest';
import { screen } from '@testing-library/react';
import { apiClient, apiMessage, SESSION_ENDED_NOTICE } from './api-client';
import { getSession } from '../features/auth/session';
import { installFakeApi } from '../test/fake-api';
import { renderApp, signInAs } from '../test/render';

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

describe('api-client', () => {
  it('sends the session token as a bearer token', async () => {
    api = installFakeApi({ 'GET /users': () => ({ status: 200, data: [] }) });
    signInAs('admin');
    await apiClient.get('/users');
    expect(api.requests[0].authorization).toBe('Bearer token-for-admin');
  });

  it('sends no Authorization header when signed out', async () => {
    api = installFakeApi({ 'GET /health': () => ({ status: 200, data: { status: 'ok' } }) });
    await apiClient.get('/health');
    expect(api.requests[0].authorization).toBeUndefined();
  });

  it('ends the session on a 401 from any route but sign-in', async () => {
    api = installFakeApi({
      'GET /users': () => ({ status: 401, data: { statusCode: 401, message: 'Unauthorized' } }),
      'POST /auth/login': () => ({ status: 401, data: { statusCode: 401, message: 'No' } }),
    });
    signInAs('admin');

    await expect(apiClient.post('/auth/login', {})).rejects.toThrow();
    expect(getSession()).not.toBeNull();

    await expect(apiClient.get('/users')).rejects.toThrow();
    expect(getSession()).toBeNull();
  });

  it('returns to sign-in, saying why, when a page read answers 401', async () => {
    api = installFakeApi({
      'GET /terms': () => ({ status: 401, data: { statusCode: 401, message: 'Unauthorized' } }),
    });
    signInAs('advisor');
    const { router } = renderApp('/advising');

    expect(await screen.findByRole('heading', { level: 1, name: 'Sign in' })).toBeInTheDocument();
    expect(router.state.location.pathname).toBe('/sign-in');
    expect(screen.getByRole('status')).toHaveTextContent(SESSION_ENDED_NOTICE);
  });

  it('reads the API error message, single or listed', () => {
    const error = (message: unknown) =>
      Object.assign(new Error('x'), {
        isAxiosError: true,
        response: { data: { statusCode: 400, message, error: 'Bad Request' } },
      });
    expect(apiMessage(error('Password too short'))).toBe('Password too short');
    expect(apiMessage(error(['a must be set.', 'b must be set.']))).toBe(
      'a must be set. b must be set.',
    );
    expect(apiMessage(new Error('plain'))).toBeUndefined();
  });
});
