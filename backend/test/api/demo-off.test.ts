import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { api, DEMO_PASSWORD, signIn, withDatabase } from '../support/api';
import { runServerToExit, startServer, type TestServer } from '../support/server';

const ADMIN_EMAIL = 'first.admin@halden.example';
const ADMIN_PASSWORD = 'first-admin-password-2026';

describe('a server started with the demo off', () => {
  let server: TestServer;

  beforeAll(async () => {
    server = await startServer({
      KINPATH_DEMO: 'off',
      KINPATH_ADMIN_EMAIL: ADMIN_EMAIL,
      KINPATH_ADMIN_PASSWORD: ADMIN_PASSWORD,
    });
  });
  afterAll(async () => {
    await server?.stop();
  });

  it('creates the admin from the environment, who can sign in', async () => {
    const token = await signIn(ADMIN_EMAIL, ADMIN_PASSWORD, server.url);
    const me = await api(server.url).get('/api/auth/me').set('Authorization', `Bearer ${token}`);
    expect(me.body).toMatchObject({ email: ADMIN_EMAIL, role: 'admin' });
  });

  it('has no demo accounts and no demo data', async () => {
    const res = await api(server.url)
      .post('/api/auth/login')
      .send({ email: 'admin@halden.example', password: DEMO_PASSWORD });
    expect(res.status).toBe(401);
    const counts = await withDatabase(async (db) => {
      const { rows } = await db.query<Record<string, string>>(`
        SELECT (SELECT count(*) FROM users) AS users,
               (SELECT count(*) FROM courses) AS courses,
               (SELECT count(*) FROM offerings) AS offerings,
               (SELECT count(*) FROM students) AS students,
               (SELECT count(*) FROM records) AS records`);
      return rows[0];
    }, server.databaseName);
    expect(counts).toEqual({
      users: '1',
      courses: '0',
      offerings: '0',
      students: '0',
      records: '0',
    });
  });

  it('does not print any password', () => {
    expect(server.output()).not.toContain(ADMIN_PASSWORD);
  });
});

describe('a server with the demo off and no admin settings', () => {
  it('refuses to start with one clear sentence', async () => {
    const { code, output } = await runServerToExit({ KINPATH_DEMO: 'off' });
    expect(code).not.toBe(0);
    expect(output).toContain('KINPATH_ADMIN_EMAIL and KINPATH_ADMIN_PASSWORD');
  });
});
