import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, uniqueEmail, withDatabase } from '../support/api';
import { linkToken, mailsTo, waitForMail } from '../support/mail';

const GOOD_PASSWORD = 'heron-ledger-quietly-9';
let admin: string;

beforeAll(async () => {
  admin = await signIn(DEMO_USERS.admin);
});

async function invite(role = 'advisor', extra: Record<string, string> = {}) {
  const email = uniqueEmail('invited');
  const res = await api()
    .post('/api/users')
    .set(...bearer(admin))
    .send({ email, displayName: 'Invited Person', role, ...extra });
  expect(res.status, res.text).toBe(201);
  expect(res.body).toMatchObject({ active: false, pendingInvitation: true });
  expect(res.body.notice).toMatch(/invitation e-mail is on its way/i);
  return { email, id: res.body.id as string };
}

async function withPassword(role = 'advisor') {
  const email = uniqueEmail(role);
  const res = await api()
    .post('/api/users')
    .set(...bearer(admin))
    .send({ email, displayName: 'Test Person', role, password: GOOD_PASSWORD });
  expect(res.status, res.text).toBe(201);
  return { email, id: res.body.id as string };
}

/** A documentation address of its own per test run, so reruns on one database start afresh. */
const testAddress = () =>
  `198.18.${Math.floor(Math.random() * 250)}.${1 + Math.floor(Math.random() * 250)}`;

const accept = (token: string, password = GOOD_PASSWORD) =>
  api().post('/api/auth/invitations/accept').send({ token, password });

describe('invitations', () => {
  it('e-mails a single-use link that sets the password and activates the account', async () => {
    const { email } = await invite();
    const [mail] = await waitForMail(email);
    expect(mail.subject).toBe('Your Kinpath account');
    const token = linkToken(mail, 'invitation');
    expect(mail.html).toContain(`/invitation/${token}`);

    // Only the hash is stored.
    await withDatabase(async (db) => {
      const plain = await db.query('SELECT 1 FROM account_tokens WHERE token_hash = $1', [token]);
      expect(plain.rowCount).toBe(0);
      const hashed = await db.query(
        'SELECT expires_at - created_at AS life FROM account_tokens WHERE token_hash = $1',
        [createHash('sha256').update(token).digest('hex')],
      );
      expect(hashed.rows[0].life.hours ?? hashed.rows[0].life.days * 24).toBe(72);
    });

    expect(
      (await api().post('/api/auth/login').send({ email, password: GOOD_PASSWORD })).status,
    ).toBe(401);
    const weak = await accept(token, 'qwertyuiop123');
    expect(weak.status).toBe(400);
    expect(JSON.stringify(weak.body.message)).toMatch(/too common/);
    const ok = await accept(token);
    expect(ok.status, ok.text).toBe(200);
    expect(ok.body.email).toBe(email);
    expect(await signIn(email, GOOD_PASSWORD)).toEqual(expect.any(String));

    const again = await accept(token, 'another-fine-phrase-42');
    expect(again.status).toBe(400);
    expect(again.body.message).toMatch(/cannot be used/);
  });

  it('resends with a new link that replaces the old one, and revokes', async () => {
    const { email, id } = await invite('department_head', { department: 'MTH' });
    const [first] = await waitForMail(email);
    const resent = await api()
      .post(`/api/users/${id}/invitation`)
      .set(...bearer(admin));
    expect(resent.status).toBe(202);
    const mails = await waitForMail(email, 2);
    const oldToken = linkToken(first, 'invitation');
    const newToken = linkToken(mails[1], 'invitation');
    expect(newToken).not.toBe(oldToken);
    expect((await accept(oldToken)).status).toBe(400);

    const revoked = await api()
      .delete(`/api/users/${id}/invitation`)
      .set(...bearer(admin));
    expect(revoked.status).toBe(204);
    expect((await accept(newToken)).status).toBe(400);
  });

  it('refuses to resend or revoke for an account that has a password', async () => {
    const { id } = await withPassword();
    const res = await api()
      .post(`/api/users/${id}/invitation`)
      .set(...bearer(admin));
    expect(res.status).toBe(409);
  });

  it('refuses a made-up or malformed token with the same message', async () => {
    const madeUp = await accept('A'.repeat(43));
    expect(madeUp.status).toBe(400);
    expect(madeUp.body.message).toMatch(/cannot be used/);
    const malformed = await accept('../../etc/passwd');
    expect(malformed.status).toBe(400);
  });

  it('refuses an expired link', async () => {
    const { email } = await invite();
    const token = linkToken((await waitForMail(email))[0], 'invitation');
    await withDatabase((db) =>
      db.query(
        `UPDATE account_tokens SET created_at = now() - interval '73 hours', expires_at = now() - interval '1 hour' WHERE token_hash = $1`,
        [createHash('sha256').update(token).digest('hex')],
      ),
    );
    expect((await accept(token)).status).toBe(400);
  });
});

describe('password reset', () => {
  it('answers the same for a known and an unknown address', async () => {
    const { email } = await withPassword();
    const known = await api().post('/api/auth/password-reset').send({ email });
    const unknown = await api()
      .post('/api/auth/password-reset')
      .send({ email: uniqueEmail('nobody') });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(known.body).toEqual(unknown.body);
  });

  it('sends a single-use link; the new password works and ends other sessions', async () => {
    const { email } = await withPassword();
    const oldSession = await signIn(email, GOOD_PASSWORD);
    await api().post('/api/auth/password-reset').send({ email: email.toUpperCase() });
    const [mail] = await waitForMail(email);
    const token = linkToken(mail, 'reset-password');
    const newPassword = 'otter-lantern-meadow-31';
    const res = await api()
      .post('/api/auth/password-reset/confirm')
      .send({ token, password: newPassword });
    expect(res.status, res.text).toBe(200);
    expect(
      (
        await api()
          .get('/api/auth/me')
          .set(...bearer(oldSession))
      ).status,
    ).toBe(401);
    expect(
      (await api().post('/api/auth/login').send({ email, password: GOOD_PASSWORD })).status,
    ).toBe(401);
    expect(await signIn(email, newPassword)).toEqual(expect.any(String));
    const reuse = await api()
      .post('/api/auth/password-reset/confirm')
      .send({ token, password: 'yet-another-phrase-77' });
    expect(reuse.status).toBe(400);
  });

  it('sends nothing to an address without an active account', async () => {
    const { email } = await invite();
    await waitForMail(email);
    await api().post('/api/auth/password-reset').send({ email });
    await new Promise((r) => setTimeout(r, 500));
    expect(mailsTo(email)).toHaveLength(1);
  });
});

describe('sign-in throttling', () => {
  it('after 5 failures pauses that account from that address only, and audits it', async () => {
    const { email } = await withPassword();
    const stranger = testAddress();
    const attempt = (password: string, address: string) =>
      api().post('/api/auth/login').set('X-Forwarded-For', address).send({ email, password });
    for (let i = 0; i < 5; i++) {
      expect((await attempt('wrong-password-here', stranger)).status).toBe(401);
    }
    const paused = await attempt(GOOD_PASSWORD, stranger);
    expect(paused.status).toBe(429);
    expect(paused.body.message).toMatch(/paused for 15 minutes/);
    expect(paused.headers['retry-after']).toBe('900');

    const trail = await api()
      .get('/api/audit')
      .query({ action: 'auth.sign_in_throttled', actor: email })
      .set(...bearer(admin));
    expect(trail.status).toBe(200);
    expect(
      trail.body.items.map((i: { detail: { scope: string } }) => i.detail.scope).sort(),
    ).toEqual(['account', 'account_address']);
  });

  it('never shuts the account for its owner: the right password from elsewhere gets in, slowed', async () => {
    const { email } = await withPassword();
    const attempt = (password: string, address: string) =>
      api().post('/api/auth/login').set('X-Forwarded-For', address).send({ email, password });
    // A stranger's failures from two addresses.
    for (const address of [testAddress(), testAddress()]) {
      for (let i = 0; i < 3; i++) {
        expect((await attempt('wrong-password-here', address)).status).toBe(401);
      }
    }
    // Six failures: each attempt on the account now waits 2 s first (1 s after the fifth,
    // doubling), whatever its password; the owner's right one still gets in.
    const started = Date.now();
    const owner = await attempt(GOOD_PASSWORD, testAddress());
    expect(owner.status, owner.text).toBe(200);
    expect(Date.now() - started).toBeGreaterThanOrEqual(1_900);
    // Success clears the slow-down.
    const left = await withDatabase((db) =>
      db.query(`SELECT 1 FROM sign_in_throttle WHERE key = $1`, [`account:${email}`]),
    );
    expect(left.rowCount).toBe(0);
  });

  it('counts only failures: a success clears the account’s counter', async () => {
    const { email } = await withPassword();
    const address = testAddress();
    const attempt = (password: string) =>
      api().post('/api/auth/login').set('X-Forwarded-For', address).send({ email, password });
    for (let round = 0; round < 3; round++) {
      for (let i = 0; i < 4; i++) expect((await attempt('wrong-password-here')).status).toBe(401);
      expect((await attempt(GOOD_PASSWORD)).status).toBe(200);
    }
  });

  it('pauses one address after 20 failures across accounts', async () => {
    const address = testAddress();
    for (let i = 0; i < 20; i++) {
      const res = await api()
        .post('/api/auth/login')
        .set('X-Forwarded-For', address)
        .send({ email: uniqueEmail('spray'), password: 'wrong-password-here' });
      expect(res.status).toBe(401);
    }
    const blocked = await api()
      .post('/api/auth/login')
      .set('X-Forwarded-For', address)
      .send({ email: DEMO_USERS.advisor, password: 'kinpath-demo-2026' });
    expect(blocked.status).toBe(429);
    // Another address is not affected.
    const other = await api()
      .post('/api/auth/login')
      .set('X-Forwarded-For', testAddress())
      .send({ email: DEMO_USERS.advisor, password: 'kinpath-demo-2026' });
    expect(other.status).toBe(200);
  });
});

describe('sessions', () => {
  it('renews a token for the same session, within the session’s end', async () => {
    const { email } = await withPassword();
    const login = await api().post('/api/auth/login').send({ email, password: GOOD_PASSWORD });
    const { accessToken, expiresAt, sessionExpiresAt } = login.body;
    const life = Date.parse(expiresAt) - Date.now();
    expect(life).toBeGreaterThan(14 * 60_000);
    expect(life).toBeLessThanOrEqual(15 * 60_000 + 1000);
    const sessionLife = Date.parse(sessionExpiresAt) - Date.now();
    expect(Math.round(sessionLife / 3_600_000)).toBe(12);

    const renewed = await api()
      .post('/api/auth/refresh')
      .set(...bearer(accessToken));
    expect(renewed.status).toBe(200);
    expect(renewed.body.sessionExpiresAt).toBe(sessionExpiresAt);
    const sid = (t: string) => JSON.parse(Buffer.from(t.split('.')[1], 'base64url').toString()).sid;
    expect(sid(renewed.body.accessToken)).toBe(sid(accessToken));

    // Near the session's end a renewal never reaches past it, and after it nothing works.
    await withDatabase((db) =>
      db.query(`UPDATE sessions SET expires_at = now() + interval '30 seconds' WHERE id = $1`, [
        sid(accessToken),
      ]),
    );
    const late = await api()
      .post('/api/auth/refresh')
      .set(...bearer(accessToken));
    expect(late.status).toBe(200);
    expect(Date.parse(late.body.expiresAt)).toBeLessThanOrEqual(Date.now() + 31_000);
    await withDatabase((db) =>
      db.query(`UPDATE sessions SET expires_at = now() - interval '1 second' WHERE id = $1`, [
        sid(accessToken),
      ]),
    );
    for (const token of [accessToken, late.body.accessToken]) {
      expect(
        (
          await api()
            .post('/api/auth/refresh')
            .set(...bearer(token))
        ).status,
      ).toBe(401);
    }
  });

  it('signing out ends that session only', async () => {
    const { email } = await withPassword();
    const first = await signIn(email, GOOD_PASSWORD);
    const second = await signIn(email, GOOD_PASSWORD);
    const out = await api()
      .post('/api/auth/logout')
      .set(...bearer(first));
    expect(out.status).toBe(204);
    expect(
      (
        await api()
          .get('/api/auth/me')
          .set(...bearer(first))
      ).status,
    ).toBe(401);
    expect(
      (
        await api()
          .post('/api/auth/refresh')
          .set(...bearer(first))
      ).status,
    ).toBe(401);
    expect(
      (
        await api()
          .get('/api/auth/me')
          .set(...bearer(second))
      ).status,
    ).toBe(200);
  });

  it('a role change applies on the next request of an open session', async () => {
    const { email, id } = await withPassword('advisor');
    const token = await signIn(email, GOOD_PASSWORD);
    expect(
      (
        await api()
          .get('/api/imports')
          .set(...bearer(token))
      ).status,
    ).toBe(403);
    const patched = await api()
      .patch(`/api/users/${id}`)
      .set(...bearer(admin))
      .send({ role: 'registrar' });
    expect(patched.status).toBe(200);
    expect(
      (
        await api()
          .get('/api/imports')
          .set(...bearer(token))
      ).status,
    ).toBe(200);
    const me = await api()
      .get('/api/auth/me')
      .set(...bearer(token));
    expect(me.body.role).toBe('registrar');
  });

  it('deactivation ends every session at once', async () => {
    const { email, id } = await withPassword();
    const tokens = [await signIn(email, GOOD_PASSWORD), await signIn(email, GOOD_PASSWORD)];
    await api()
      .patch(`/api/users/${id}`)
      .set(...bearer(admin))
      .send({ active: false });
    for (const token of tokens) {
      expect(
        (
          await api()
            .post('/api/auth/refresh')
            .set(...bearer(token))
        ).status,
      ).toBe(401);
    }
    await withDatabase(async (db) => {
      const open = await db.query(
        'SELECT count(*)::int AS n FROM sessions WHERE user_id = $1 AND ended_at IS NULL',
        [id],
      );
      expect(open.rows[0].n).toBe(0);
    });
  });
});

describe('passwords', () => {
  it('refuses a common password when an admin sets one', async () => {
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: uniqueEmail('weak'),
        displayName: 'Weak',
        role: 'advisor',
        password: 'password1234',
      });
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body.message)).toMatch(/too common/);
  });
});
