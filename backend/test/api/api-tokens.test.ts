import { API_TOKEN_SCOPES, type ApiTokenScope } from '@kinpath/contracts';
import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, uniqueEmail, withDatabase } from '../support/api';
import { CATALOGUE, upload } from '../support/imports';

const DAY_MS = 86_400_000;
const inDays = (days: number) => new Date(Date.now() + days * DAY_MS).toISOString().slice(0, 10);

/** The status a GET answers with this bearer secret. */
async function statusOf(path: string, secret: string): Promise<number> {
  return (
    await api()
      .get(path)
      .set(...bearer(secret))
  ).status;
}

let admin: string;
let registrar: string;

async function createToken(
  session: string,
  scopes: ApiTokenScope[],
  extra: Record<string, unknown> = {},
) {
  const res = await api()
    .post('/api/api-tokens')
    .set(...bearer(session))
    .send({ name: `Nightly ${scopes.join(' ')}`, scopes, expiresOn: inDays(90), ...extra });
  expect(res.status, res.text).toBe(201);
  return res.body as { token: { id: string; name: string }; secret: string };
}

/** A new registrar account with a password, signed in. */
async function newRegistrar() {
  const email = uniqueEmail('registrar.script');
  const password = 'quartz-meadow-harbour-9';
  const res = await api()
    .post('/api/users')
    .set(...bearer(admin))
    .send({ email, password, displayName: 'Script Owner', role: 'registrar' });
  expect(res.status, res.text).toBe(201);
  return { id: res.body.id as string, email, session: await signIn(email, password) };
}

beforeAll(async () => {
  admin = await signIn(DEMO_USERS.admin);
  registrar = await signIn(DEMO_USERS.registrar);
});

describe('script tokens', () => {
  it('shows the secret once, lists the token without it, and stores only its SHA-256', async () => {
    const { token, secret } = await createToken(registrar, ['terms:read']);
    expect(secret).toMatch(/^kp_[A-Za-z0-9_-]{43}$/);

    const list = await api()
      .get('/api/api-tokens')
      .set(...bearer(registrar));
    expect(list.status).toBe(200);
    const listed = list.body.find((t: { id: string }) => t.id === token.id);
    expect(listed).toMatchObject({
      name: token.name,
      scopes: ['terms:read'],
      ownerEmail: DEMO_USERS.registrar,
      state: 'active',
      lastUsedAt: null,
    });
    expect(list.text).not.toContain(secret);
    expect(list.text).not.toContain(secret.slice(3));

    const row = await withDatabase(async (c) => {
      const res = await c.query(
        `SELECT encode(secret_sha256, 'hex') AS digest, row_to_json(t)::text AS whole
           FROM api_tokens t WHERE id = $1`,
        [token.id],
      );
      return res.rows[0] as { digest: string; whole: string };
    });
    expect(row.digest).toBe(createHash('sha256').update(secret).digest('hex'));
    expect(row.whole).not.toContain(secret.slice(3));

    // A use is noted on the token, not as an audit row: reading writes nothing to the trail.
    expect(await statusOf('/api/terms', secret)).toBe(200);
    const after = await api()
      .get('/api/api-tokens')
      .set(...bearer(registrar));
    expect(after.body.find((t: { id: string }) => t.id === token.id).lastUsedAt).not.toBeNull();
    const afterCount = await withDatabase(
      async (c) =>
        (
          await c.query(
            `SELECT count(*)::int AS n FROM audit_events WHERE detail->>'apiTokenId' = $1`,
            [token.id],
          )
        ).rows[0].n,
    );
    expect(afterCount).toBe(0);
  });

  it('opens the routes of its scopes only, and never the session, account or token routes', async () => {
    const { secret } = await createToken(registrar, ['terms:read', 'imports:read']);
    expect(await statusOf('/api/terms', secret)).toBe(200);
    expect(await statusOf('/api/imports', secret)).toBe(200);
    for (const [method, path] of [
      ['get', '/api/courses'],
      ['get', '/api/forecasts/about'],
      ['post', '/api/imports/preview'],
      ['get', '/api/auth/me'],
      ['post', '/api/auth/refresh'],
      ['post', '/api/auth/logout'],
      ['get', '/api/api-tokens'],
      ['post', '/api/api-tokens'],
      ['get', '/api/audit'],
      ['get', '/api/model/settings'],
    ] as const) {
      const client = api();
      const res = await client[method](path)
        .set(...bearer(secret))
        .send({});
      expect(res.status, `${method} ${path}`).toBe(403);
      expect(res.body.message).toMatch(/script token/);
    }
  });

  it('acts with its owner’s role: an admin’s token with every scope cannot reach imports', async () => {
    const { secret } = await createToken(admin, [...API_TOKEN_SCOPES]);
    expect(await statusOf('/api/imports', secret)).toBe(403);
    expect(await statusOf('/api/users', secret)).toBe(403);
    expect(await statusOf('/api/courses', secret)).toBe(200);
  });

  it('answers 401 to an unknown, revoked or expired token', async () => {
    const unknown = 'kp_' + 'A'.repeat(43);
    expect(await statusOf('/api/terms', unknown)).toBe(401);

    const revoked = await createToken(registrar, ['terms:read']);
    expect(await statusOf('/api/terms', revoked.secret)).toBe(200);
    const res = await api()
      .post(`/api/api-tokens/${revoked.token.id}/revoke`)
      .set(...bearer(registrar));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ state: 'revoked', revokedAt: expect.any(String) });
    const refused = await api()
      .get('/api/terms')
      .set(...bearer(revoked.secret));
    expect(refused.status).toBe(401);
    expect(refused.body.message).toMatch(/not valid/);

    const expired = await createToken(registrar, ['terms:read']);
    await withDatabase((c) =>
      c.query(`UPDATE api_tokens SET expires_at = now() - interval '1 second' WHERE id = $1`, [
        expired.token.id,
      ]),
    );
    expect(await statusOf('/api/terms', expired.secret)).toBe(401);
    const list = await api()
      .get('/api/api-tokens')
      .set(...bearer(registrar));
    expect(list.body.find((t: { id: string }) => t.id === expired.token.id).state).toBe('expired');
  });

  it('stops working when its owner is deactivated', async () => {
    const owner = await newRegistrar();
    const { secret } = await createToken(owner.session, ['terms:read']);
    expect(await statusOf('/api/terms', secret)).toBe(200);
    const off = await api()
      .patch(`/api/users/${owner.id}`)
      .set(...bearer(admin))
      .send({ active: false });
    expect(off.status, off.text).toBe(200);
    expect(await statusOf('/api/terms', secret)).toBe(401);
  });

  it('lets admins manage every token and registrar staff only their own', async () => {
    const other = await newRegistrar();
    const made = await createToken(admin, ['imports:write'], { ownerId: other.id });
    const mine = await api()
      .get('/api/api-tokens')
      .set(...bearer(registrar));
    expect(
      mine.body.every((t: { ownerEmail: string }) => t.ownerEmail === DEMO_USERS.registrar),
    ).toBe(true);
    const all = await api()
      .get('/api/api-tokens')
      .set(...bearer(admin));
    expect(all.body.some((t: { id: string }) => t.id === made.token.id)).toBe(true);
    // Someone else's token: unknown to a registrar.
    const foreign = await api()
      .post(`/api/api-tokens/${made.token.id}/revoke`)
      .set(...bearer(registrar));
    expect(foreign.status).toBe(404);
    const forOther = await api()
      .post('/api/api-tokens')
      .set(...bearer(registrar))
      .send({ name: 'x', scopes: ['terms:read'], expiresOn: inDays(5), ownerId: other.id });
    expect(forOther.status).toBe(403);
    // Owners are registrar staff or admins; expiry at most a year ahead.
    const advisor = await withDatabase(
      async (c) =>
        (await c.query(`SELECT id FROM users WHERE email = $1`, [DEMO_USERS.advisor])).rows[0].id,
    );
    for (const body of [
      { name: 'x', scopes: ['terms:read'], expiresOn: inDays(5), ownerId: advisor },
      { name: 'x', scopes: ['terms:read'], expiresOn: inDays(400) },
      { name: 'x', scopes: ['terms:read'], expiresOn: inDays(-1) },
      { name: 'x', scopes: ['students:read'], expiresOn: inDays(5) },
      { name: 'x', scopes: [], expiresOn: inDays(5) },
      { name: ' ', scopes: ['terms:read'], expiresOn: inDays(5) },
    ]) {
      const res = await api()
        .post('/api/api-tokens')
        .set(...bearer(admin))
        .send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
    }
    expect(
      (
        await api()
          .post('/api/api-tokens')
          .set(...bearer(admin))
          .send({ name: 'Year', scopes: ['terms:read'], expiresOn: inDays(365) })
      ).status,
    ).toBe(201);
  });

  it('puts the token’s name and its owner on the audit entries of what it does', async () => {
    const { token, secret } = await createToken(registrar, ['imports:write']);
    const res = await upload(process.env.KINPATH_TEST_URL!, secret, 'catalogue', CATALOGUE);
    expect(res.status, res.text).toBe(202);
    const entries = await withDatabase(
      async (c) =>
        (
          await c.query(
            `SELECT action, actor_email, target, detail FROM audit_events
              WHERE detail->>'apiTokenId' = $1 ORDER BY id`,
            [token.id],
          )
        ).rows,
    );
    expect(entries).toHaveLength(1);
    expect(entries[0]).toMatchObject({
      action: 'import.uploaded',
      actor_email: DEMO_USERS.registrar,
      target: res.body.id,
      detail: { apiToken: token.name, apiTokenId: token.id },
    });
    const made = await withDatabase(
      async (c) =>
        (
          await c.query(`SELECT action, detail FROM audit_events WHERE target = $1 ORDER BY id`, [
            token.id,
          ])
        ).rows,
    );
    expect(made.map((e) => e.action)).toEqual(['api_token.created']);
    expect(JSON.stringify(made)).not.toContain(secret.slice(3));
  });
});
