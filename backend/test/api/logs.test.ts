import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, DEMO_USERS, signIn } from '../support/api';
import { emptyDemoDir, importCommitted, CATALOGUE } from '../support/imports';
import { linkToken, waitForMail } from '../support/mail';
import { startServer, type TestServer } from '../support/server';

/**
 * The server's own output, at its most talkative level, after sign-ins (good and
 * bad), an invitation, a password reset, imports with student numbers and lookups:
 * JSON lines only, and none of the secrets or student numbers it handled.
 */
const PASSWORD = 'gannet-orchard-velvet-84';
const NEW_PASSWORD = 'quarry-mosaic-tundra-26';
const STUDENT_IDS = ['HX7731905', 'HX7731906'];
const shared = JSON.parse(process.env.KINPATH_TEST_SERVER_ENV ?? '{}') as Record<string, string>;
const mailCaught = Boolean(shared.KINPATH_SMTP_PORT && process.env.KINPATH_MAIL_DIR);

let server: TestServer;
const secrets: string[] = [PASSWORD, NEW_PASSWORD, ...STUDENT_IDS];

beforeAll(async () => {
  server = await startServer({
    KINPATH_DEMO_DIR: emptyDemoDir(),
    KINPATH_LOG_LEVEL: 'verbose',
    ...(mailCaught ? { KINPATH_SMTP_PORT: shared.KINPATH_SMTP_PORT } : {}),
  });
}, 90_000);

afterAll(async () => {
  await server?.stop();
});

describe('server logs', () => {
  it('are JSON lines that never hold a password, a token or a student number', async () => {
    const url = server.url;
    const admin = await signIn(DEMO_USERS.admin, undefined, url);
    secrets.push(admin);
    const email = `log.check.${Date.now()}@halden.example`;
    const created = await request(url)
      .post('/api/users')
      .set(...bearer(admin))
      .send({ email, displayName: 'Log Check', role: 'advisor' });
    expect(created.status).toBe(201);
    if (mailCaught) {
      const token = linkToken((await waitForMail(email))[0], 'invitation');
      secrets.push(token);
      expect(
        (
          await request(url)
            .post('/api/auth/invitations/accept')
            .send({ token, password: PASSWORD })
        ).status,
      ).toBe(200);
      await request(url).post('/api/auth/password-reset').send({ email });
      const reset = linkToken((await waitForMail(email, 2))[1], 'reset-password');
      secrets.push(reset);
      await request(url)
        .post('/api/auth/password-reset/confirm')
        .send({ token: reset, password: NEW_PASSWORD });
    } else {
      await request(url)
        .patch(`/api/users/${created.body.id}`)
        .set(...bearer(admin))
        .send({ displayName: 'Log Check' });
    }
    // Failed sign-ins with the secret as the password, and as the e-mail address.
    await request(url)
      .post('/api/auth/login')
      .send({ email, password: `${PASSWORD}-wrong` });
    await request(url).post('/api/auth/login').send({ email: PASSWORD, password: PASSWORD });

    const registrar = await signIn(DEMO_USERS.registrar, undefined, url);
    secrets.push(registrar);
    await importCommitted(url, registrar, 'catalogue', CATALOGUE);
    await importCommitted(
      url,
      registrar,
      'students',
      `student_id,program,entry_term,status\n${STUDENT_IDS.map((id) => `${id},Computing BSc,2024-FA,active`).join('\n')}\n`,
    );
    // A rejected row echoes its bad value to the registrar, never to the log.
    await request(url)
      .post('/api/imports')
      .set(...bearer(registrar))
      .field('kind', 'records')
      .attach(
        'file',
        Buffer.from(
          `student_id,term,course_code,grade,satisfaction,credits_attempted\n${STUDENT_IDS[0]},2024-QQ,CMP 9999,Q,9,x\n`,
        ),
        'records.csv',
      );
    for (const studentId of [...STUDENT_IDS, 'HX0000000']) {
      await request(url)
        .post('/api/students/lookup')
        .set(...bearer(registrar))
        .send({ studentId });
    }
    await request(url)
      .post('/api/auth/logout')
      .set(...bearer(admin));
    await new Promise((r) => setTimeout(r, 1500));

    const output = server.output();
    expect(output.length).toBeGreaterThan(100);
    for (const secret of secrets) {
      expect(output.includes(secret), `the log holds ${secret.slice(0, 6)}…`).toBe(false);
    }
    expect(output).not.toMatch(/\$2[aby]\$\d\d\$/); // no password hash either

    // Worker processes announce themselves in one plain line of their own; the rest is JSON.
    const lines = output
      .split('\n')
      .filter((line) => line.trim() !== '' && !/^kinpath [a-z]+ worker \d+: /.test(line));
    const notJson = lines.filter((line) => {
      try {
        const entry = JSON.parse(line) as { level?: unknown; message?: unknown };
        return typeof entry.level !== 'string' || entry.message === undefined;
      } catch {
        return true;
      }
    });
    expect(notJson).toEqual([]);
  }, 90_000);
});
