import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, DEMO_PASSWORD, DEMO_USERS, signIn, uniqueEmail } from '../support/api';
import { emptyDemoDir } from '../support/imports';
import { mailsTo, waitForMail } from '../support/mail';
import { startServer, type TestServer } from '../support/server';

/**
 * The request limits as shipped: a server of its own with the default settings (no
 * trusted proxy, no scaling), so these counts touch no other test.
 */
let server: TestServer;
let admin: string;
let registrar: string;
let advisor: string;
let otherRegistrar: { email: string; token: string };
let looker: { email: string; token: string };
let resetter: { email: string; token: string };
const PASSWORD = 'a-long-enough-password';

beforeAll(async () => {
  const shared = JSON.parse(process.env.KINPATH_TEST_SERVER_ENV ?? '{}') as Record<string, string>;
  server = await startServer({
    KINPATH_DEMO_DIR: emptyDemoDir(),
    ...(shared.KINPATH_SMTP_PORT ? { KINPATH_SMTP_PORT: shared.KINPATH_SMTP_PORT } : {}),
  });
  admin = await signIn(DEMO_USERS.admin, undefined, server.url);
  registrar = await signIn(DEMO_USERS.registrar, undefined, server.url);
  advisor = await signIn(DEMO_USERS.advisor, undefined, server.url);
  // Made before the sign-in limit test spends this address's budget.
  otherRegistrar = await newUser('registrar');
  looker = await newUser('advisor');
  resetter = await newUser('advisor');
}, 90_000);

afterAll(async () => {
  await server?.stop();
});

const api = () => request(server.url);

async function newUser(role: string): Promise<{ email: string; token: string }> {
  const email = uniqueEmail(role);
  const res = await api()
    .post('/api/users')
    .set(...bearer(admin))
    .send({ email, displayName: 'Limit Tester', role, password: PASSWORD });
  expect(res.status, res.text).toBe(201);
  return { email, token: await signIn(email, PASSWORD, server.url) };
}

async function auditItems(action: string, actor?: string) {
  const res = await api()
    .get('/api/audit')
    .query({ action, ...(actor ? { actor } : {}) })
    .set(...bearer(admin));
  expect(res.status).toBe(200);
  return res.body.items as Array<{ actorEmail: string | null; detail: Record<string, unknown> }>;
}

/** Sends until the first 429 (at most `max`); returns how many passed and the 429. */
async function untilLimited(max: number, send: (i: number) => request.Test) {
  for (let i = 0; i < max; i++) {
    const res = await send(i);
    if (res.status === 429) return { passed: i, res };
    expect(res.status, res.text).toBeLessThan(500);
  }
  return { passed: max, res: undefined };
}

function expectLimited(res: request.Response | undefined) {
  expect(res?.status).toBe(429);
  const wait = Number(res?.headers['retry-after']);
  expect(wait).toBeGreaterThan(0);
  expect(res?.body).toMatchObject({ statusCode: 429, error: 'Too Many Requests' });
  expect(res?.body.message).toMatch(/Try again in \d+ (seconds|minutes)/);
}

describe('client addresses', () => {
  it('ignores X-Forwarded-For from a client that is not a configured proxy', async () => {
    const email = uniqueEmail('forwarded');
    await api()
      .post('/api/auth/login')
      .set('X-Forwarded-For', '203.0.113.77')
      .send({ email, password: 'wrong-password-here' });
    const [failed] = await auditItems('auth.sign_in_failed', email);
    expect(failed.detail.address).not.toBe('203.0.113.77');
    expect(String(failed.detail.address)).toMatch(/127\.0\.0\.1$/);
  });
});

describe('per-address and per-user request limits', () => {
  it('limits backtests per user, and one user’s limit leaves another’s alone', async () => {
    const { passed, res } = await untilLimited(15, () =>
      api()
        .post('/api/model/evaluations')
        .set(...bearer(registrar))
        .send({ configurations: 'not a list' }),
    );
    expect(passed).toBe(10);
    expectLimited(res);
    const fresh = await api()
      .post('/api/model/evaluations')
      .set(...bearer(otherRegistrar.token))
      .send({ configurations: 'not a list' });
    expect(fresh.status).toBe(400);
  });

  it('limits outlook runs per user', async () => {
    const { passed, res } = await untilLimited(15, () =>
      api()
        .post('/api/forecasts/runs')
        .set(...bearer(registrar))
        .send({ term: 12 }),
    );
    expect(passed).toBe(10);
    expectLimited(res);
  });

  it('limits summary e-mails per user', async () => {
    const { passed, res } = await untilLimited(15, () =>
      api()
        .post('/api/students/s_unknown/summary')
        .set(...bearer(advisor))
        .send({ to: 'someone@elsewhere.example' }),
    );
    expect(passed).toBe(10);
    expectLimited(res);
  });

  it('limits look-ups per user and alerts the audit trail on many unknown numbers', async () => {
    const { passed, res } = await untilLimited(70, (i) =>
      api()
        .post('/api/students/lookup')
        .set(...bearer(looker.token))
        .send({ studentId: `HR${String(9_100_000 + i).padStart(7, '0')}` }),
    );
    expect(passed).toBe(60);
    expectLimited(res);
    const alerts = await auditItems('student.lookup_misses_alert', looker.email);
    // 60 misses in the window: an alert at 20, 40 and 60.
    expect(alerts.map((a) => a.detail.unknownLookups).sort()).toEqual([20, 40, 60]);
    expect(JSON.stringify(alerts)).not.toMatch(/HR\d{7}/);
  });
});

describe('password-reset e-mails', () => {
  it('sends at most 3 reset links to one account in an hour, however fast they are asked', async () => {
    const { email } = resetter;
    const answers = await Promise.all(
      Array.from({ length: 12 }, () => api().post('/api/auth/password-reset').send({ email })),
    );
    // Every request gets the same answer, capped or not.
    for (const a of answers) expect(a.status).toBe(202);
    await waitForMail(email, 3);
    await new Promise((r) => setTimeout(r, 1500));
    expect(mailsTo(email)).toHaveLength(3);
    const requested = await auditItems('auth.password_reset_requested', email);
    expect(requested.filter((r) => r.detail.capped === true)).toHaveLength(9);
  });
});

describe('sign-in requests', () => {
  it('limits sign-in requests from one address, whatever X-Forwarded-For says', async () => {
    const { passed, res } = await untilLimited(40, (i) =>
      api()
        .post('/api/auth/login')
        .set('X-Forwarded-For', `203.0.113.${i + 1}`)
        .send({ email: DEMO_USERS.advisor, password: DEMO_PASSWORD }),
    );
    // 30 a minute, less the few this file's set-up and first test spent.
    expect(passed).toBeGreaterThanOrEqual(20);
    expect(passed).toBeLessThan(30);
    expectLimited(res);
  });
});
