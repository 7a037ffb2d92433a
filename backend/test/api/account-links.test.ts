import { beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, uniqueEmail } from '../support/api';
import { linkToken, waitForMail } from '../support/mail';

const PASSWORD = 'lantern-orchard-slowly-4';
let admin: string;

beforeAll(async () => {
  admin = await signIn(DEMO_USERS.admin);
});

const check = (token: string) => api().post('/api/auth/invitations/check').send({ token });

async function invitationToken(): Promise<{ email: string; token: string }> {
  const email = uniqueEmail('link');
  await api()
    .post('/api/users')
    .set(...bearer(admin))
    .send({ email, displayName: 'Link Person', role: 'advisor' })
    .expect(201);
  return { email, token: linkToken((await waitForMail(email))[0], 'invitation') };
}

describe('checking a link when its page opens', () => {
  it('says an invitation link is usable, for whom, and does not spend it', async () => {
    const { email, token } = await invitationToken();
    for (let i = 0; i < 2; i++) {
      const res = await check(token);
      expect(res.status).toBe(200);
      expect(res.body).toEqual({ email });
    }
    // Still good for setting the password after being checked twice.
    await api()
      .post('/api/auth/invitations/accept')
      .send({ token, password: PASSWORD })
      .expect(200);
    const used = await check(token);
    expect(used.status).toBe(400);
    expect(used.body.message).toMatch(/^This link cannot be used/);
  });

  it('refuses made-up and malformed tokens before a password is typed', async () => {
    const madeUp = await check('B'.repeat(43));
    expect(madeUp.status).toBe(400);
    expect(madeUp.body.message).toMatch(/^This link cannot be used/);
    const garbage = await check('not-a-token');
    expect(garbage.status).toBe(400);
    expect(garbage.body.message).toEqual([
      'The link is not complete: open it again from the e-mail.',
    ]);
  });

  it('checks a reset link the same way, without spending it', async () => {
    const garbage = await api().post('/api/auth/password-reset/check').send({ token: 'x' });
    expect(garbage.status).toBe(400);
    const { email, token } = await invitationToken();
    // An invitation link is no reset link.
    const wrongKind = await api().post('/api/auth/password-reset/check').send({ token });
    expect(wrongKind.status).toBe(400);
    expect((await check(token)).body).toEqual({ email });
  });
});
