import { createHmac } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { api, bearer, DEMO_PASSWORD, DEMO_USERS, signIn, uniqueEmail } from '../support/api';

const SIGN_IN_REFUSED = 'The e-mail address or password is not correct.';

describe('sign-in', () => {
  for (const [role, email] of Object.entries(DEMO_USERS)) {
    it(`signs in the demo ${role}`, async () => {
      const res = await api().post('/api/auth/login').send({ email, password: DEMO_PASSWORD });
      expect(res.status).toBe(200);
      expect(typeof res.body.accessToken).toBe('string');
      expect(res.body.user).toEqual({
        id: expect.any(String),
        email,
        displayName: expect.any(String),
        role,
        department: role === 'department_head' ? 'CMP' : null,
      });
    });
  }

  it('accepts the e-mail address in any case', async () => {
    const res = await api()
      .post('/api/auth/login')
      .send({ email: ' Advisor@Halden.Example ', password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
  });

  it('answers a wrong password and an unknown e-mail identically', async () => {
    const wrong = await api()
      .post('/api/auth/login')
      .send({ email: DEMO_USERS.advisor, password: 'not-the-password' });
    const unknown = await api()
      .post('/api/auth/login')
      .send({ email: 'nobody@halden.example', password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual({
      statusCode: 401,
      message: SIGN_IN_REFUSED,
      error: 'Unauthorized',
    });
    expect(unknown.body).toEqual(wrong.body);
  });

  it('refuses a body without the fields or with extra fields', async () => {
    const missing = await api().post('/api/auth/login').send({ email: DEMO_USERS.advisor });
    expect(missing.status).toBe(400);
    const extra = await api()
      .post('/api/auth/login')
      .send({ email: DEMO_USERS.advisor, password: DEMO_PASSWORD, role: 'admin' });
    expect(extra.status).toBe(400);
    expect(extra.body).toMatchObject({ statusCode: 400, error: 'Bad Request' });
  });

  it('refuses malformed JSON with a 400 in the error shape and no stack trace', async () => {
    const res = await api()
      .post('/api/auth/login')
      .set('Content-Type', 'application/json')
      .send('{"email":');
    expect(res.status).toBe(400);
    expect(res.body).toEqual({
      statusCode: 400,
      message: 'The request body is not valid JSON.',
      error: 'Bad Request',
    });
    expect(res.text).not.toMatch(/at .+\.js:\d+/);
  });
});

describe('GET /api/auth/me', () => {
  it('returns the signed-in user', async () => {
    const token = await signIn(DEMO_USERS.department_head);
    const res = await api()
      .get('/api/auth/me')
      .set(...bearer(token));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({
      email: DEMO_USERS.department_head,
      role: 'department_head',
      department: 'CMP',
    });
  });

  it('answers 401 without a token', async () => {
    const res = await api().get('/api/auth/me');
    expect(res.status).toBe(401);
    expect(res.body).toMatchObject({ statusCode: 401, error: 'Unauthorized' });
  });

  it('answers 401 to a garbage token', async () => {
    const res = await api().get('/api/auth/me').set('Authorization', 'Bearer not.a.token');
    expect(res.status).toBe(401);
  });

  it('answers 401 to a well-formed token signed with another secret', async () => {
    const token = await signIn(DEMO_USERS.advisor);
    const [header, payload] = token.split('.');
    const forged = createHmac('sha256', 'some-other-secret-some-other-secret')
      .update(`${header}.${payload}`)
      .digest('base64url');
    const res = await api()
      .get('/api/auth/me')
      .set('Authorization', `Bearer ${header}.${payload}.${forged}`);
    expect(res.status).toBe(401);
  });

  it('answers 401 to an unsigned token', async () => {
    const token = await signIn(DEMO_USERS.admin);
    const payload = token.split('.')[1];
    const none = Buffer.from(JSON.stringify({ alg: 'none', typ: 'JWT' })).toString('base64url');
    const res = await api().get('/api/auth/me').set('Authorization', `Bearer ${none}.${payload}.`);
    expect(res.status).toBe(401);
  });
});

describe('deactivated accounts', () => {
  it('cannot sign in, and their open sessions end at once', async () => {
    const admin = await signIn(DEMO_USERS.admin);
    const email = uniqueEmail('leaving');
    const password = 'a-long-enough-password';
    const created = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({ email, displayName: 'Leaving Advisor', role: 'advisor', password });
    expect(created.status).toBe(201);
    const token = await signIn(email, password);
    expect(
      (
        await api()
          .get('/api/auth/me')
          .set(...bearer(token))
      ).status,
    ).toBe(200);

    const patched = await api()
      .patch(`/api/users/${created.body.id}`)
      .set(...bearer(admin))
      .send({ active: false });
    expect(patched.status).toBe(200);
    expect(patched.body.active).toBe(false);

    expect(
      (
        await api()
          .get('/api/auth/me')
          .set(...bearer(token))
      ).status,
    ).toBe(401);
    // The right password hears that the account is not active and whom to ask…
    const again = await api().post('/api/auth/login').send({ email, password });
    expect(again.status).toBe(403);
    expect(again.body.message).toMatch(
      /^Your Kinpath account is not active\. Ask a Kinpath administrator \(admin@halden\.example( or [^)]+)?\) to reactivate it\.$/,
    );
    // …a wrong one hears only what anyone hears, so nothing tells the account exists.
    const wrong = await api()
      .post('/api/auth/login')
      .send({ email, password: 'not-the-password-at-all' });
    expect(wrong.status).toBe(401);
    expect(wrong.body.message).toBe(SIGN_IN_REFUSED);

    // Reactivation allows a new sign-in but does not revive the old token.
    await api()
      .patch(`/api/users/${created.body.id}`)
      .set(...bearer(admin))
      .send({ active: true });
    expect(
      (
        await api()
          .get('/api/auth/me')
          .set(...bearer(token))
      ).status,
    ).toBe(401);
    expect(await signIn(email, password)).toEqual(expect.any(String));
  });
});
