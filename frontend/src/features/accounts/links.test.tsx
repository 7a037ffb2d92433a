import { afterEach, describe, expect, it } from 'vitest';
import { configure, screen } from '@testing-library/react';
import { installFakeApi } from '../../test/fake-api';
import { renderApp } from '../../test/render';

configure({ asyncUtilTimeout: 8000 });

let api: ReturnType<typeof installFakeApi> | undefined;
afterEach(() => api?.restore());

const TOKEN = 'k'.repeat(43);
const SPENT =
  'This link cannot be used: it has expired, was used already, or was replaced by a newer one. Ask for a new one.';

describe('an invitation link, checked on arrival', { timeout: 30_000 }, () => {
  it('shows the form, for whom, while the link is usable', async () => {
    api = installFakeApi({
      'POST /auth/invitations/check': () => ({
        status: 200,
        data: { email: 'new.advisor@halden.example' },
      }),
    });
    renderApp(`/invitation/${TOKEN}`);
    expect(await screen.findByLabelText('New password')).toBeInTheDocument();
    expect(screen.getByText('new.advisor@halden.example')).toBeInTheDocument();
    expect(api.requests[0]).toMatchObject({ method: 'POST', body: { token: TOKEN } });
  });

  it('says a spent link cannot be used, with no password form', async () => {
    api = installFakeApi({
      'POST /auth/invitations/check': () => ({
        status: 400,
        data: { statusCode: 400, message: SPENT, error: 'Bad Request' },
      }),
    });
    renderApp(`/invitation/${TOKEN}`);
    expect(await screen.findByRole('alert')).toHaveTextContent(
      `${SPENT} Ask the person who invited you to send a new invitation.`,
    );
    expect(screen.queryByLabelText('New password')).toBeNull();
    expect(api.requests.filter((r) => r.url === '/auth/invitations/accept')).toEqual([]);
  });
});
