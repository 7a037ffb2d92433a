import { beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, uniqueEmail, withDatabase } from '../support/api';

let admin: string;
let registrar: string;
beforeAll(async () => {
  admin = await signIn(DEMO_USERS.admin);
  registrar = await signIn(DEMO_USERS.registrar);
});

describe('headers', () => {
  it('serves the web client under a strict Content-Security-Policy', async () => {
    const res = await api().get('/sign-in');
    expect(res.status).toBe(200);
    const csp = String(res.headers['content-security-policy']);
    const directives = new Map(
      csp.split(';').map((d) => {
        const [name, ...values] = d.trim().split(/\s+/);
        return [name, values] as const;
      }),
    );
    expect(directives.get('default-src')).toEqual(["'self'"]);
    expect(directives.get('script-src')).toEqual(["'self'"]);
    expect(directives.get('connect-src')).toEqual(["'self'"]);
    expect(directives.get('font-src')).toEqual(["'self'"]);
    expect(directives.get('object-src')).toEqual(["'none'"]);
    expect(directives.get('frame-ancestors')).toEqual(["'none'"]);
    expect(csp).not.toMatch(/unsafe-eval|https?:|\*/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['referrer-policy']).toBe('no-referrer');
    expect(res.headers['x-powered-by']).toBeUndefined();
    // The built page carries no inline script for the policy to block.
    expect(res.text).not.toMatch(/<script(?![^>]*\bsrc=)[^>]*>/i);
  });

  it('keeps API answers out of caches', async () => {
    const res = await api()
      .get('/api/auth/me')
      .set(...bearer(admin));
    expect(res.headers['cache-control']).toBe('no-store');
  });

  it('answers no cross-origin request with CORS headers', async () => {
    const preflight = await api()
      .options('/api/auth/login')
      .set('Origin', 'https://elsewhere.example')
      .set('Access-Control-Request-Method', 'POST');
    expect(preflight.headers['access-control-allow-origin']).toBeUndefined();
    const simple = await api().get('/api/health').set('Origin', 'https://elsewhere.example');
    expect(simple.headers['access-control-allow-origin']).toBeUndefined();
  });
});

describe('request limits and errors', () => {
  it('refuses a JSON body over 1 MB with 413 in the error shape', async () => {
    const res = await api()
      .post('/api/auth/login')
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ email: 'a@halden.example', password: 'x'.repeat(1_100_000) }));
    expect(res.status).toBe(413);
    expect(res.body).toEqual({
      statusCode: 413,
      message: 'The request body is too large.',
      error: 'Payload Too Large',
    });
  });

  it('never answers with a stack trace', async () => {
    const res = await api()
      .patch('/api/users/not-a-uuid')
      .set(...bearer(admin))
      .send({ role: 'nonsense' });
    expect(res.status).toBeLessThan(500);
    expect(res.text).not.toMatch(/\bat .+\.(js|ts):\d+|node_modules|QueryFailedError/);
  });
});

describe('the audit trail', () => {
  it('is readable by admin and registrar staff only', async () => {
    for (const email of [DEMO_USERS.advisor, DEMO_USERS.department_head]) {
      const token = await signIn(email);
      expect(
        (
          await api()
            .get('/api/audit')
            .set(...bearer(token))
        ).status,
      ).toBe(403);
    }
    expect((await api().get('/api/audit')).status).toBe(401);
    const res = await api()
      .get('/api/audit')
      .set(...bearer(registrar));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ page: 1, pageSize: 50, total: expect.any(Number) });
    expect(res.body.actions).toEqual(expect.arrayContaining(['auth.sign_in']));
  });

  it('filters by action, actor and date range, and pages', async () => {
    const email = uniqueEmail('filtered');
    for (let i = 0; i < 3; i++) {
      await api()
        .post('/api/auth/login')
        .set('X-Forwarded-For', `198.19.${Math.floor(Math.random() * 250)}.40`)
        .send({ email, password: 'wrong-password-here' });
    }
    const today = new Date().toISOString().slice(0, 10);
    const res = await api()
      .get('/api/audit')
      .query({ action: 'auth.sign_in_failed', actor: email, from: today, to: today, pageSize: 2 })
      .set(...bearer(admin));
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(3);
    expect(res.body.items).toHaveLength(2);
    expect(res.body.items[0]).toMatchObject({
      action: 'auth.sign_in_failed',
      actorEmail: email,
      detail: { reason: 'unknown_email' },
    });
    const page2 = await api()
      .get('/api/audit')
      .query({ action: 'auth.sign_in_failed', actor: email, pageSize: 2, page: 2 })
      .set(...bearer(admin));
    expect(page2.body.items).toHaveLength(1);
    const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
    const before = await api()
      .get('/api/audit')
      .query({ actor: email, to: yesterday })
      .set(...bearer(admin));
    expect(before.body.total).toBe(0);
    const bad = await api()
      .get('/api/audit')
      .query({ from: 'last tuesday', pageSize: 5000 })
      .set(...bearer(admin));
    expect(bad.status).toBe(400);
  });

  it('exports CSV with formula prefixes neutralised, and notes the export', async () => {
    const hostile = `=HYPERLINK("http://x")+${Date.now()}@halden.example`;
    await api()
      .post('/api/auth/login')
      .set('X-Forwarded-For', `198.19.${Math.floor(Math.random() * 250)}.41`)
      .send({ email: hostile, password: 'wrong-password-here' });
    const res = await api()
      .get('/api/audit')
      .query({ actor: hostile.slice(20) })
      .set(...bearer(admin))
      .set('Accept', 'text/csv');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="kinpath-audit-/);
    const lines = res.text.trim().split('\r\n');
    expect(lines[0]).toBe(
      '"at","actor_email","actor_id","action","target","detail","target_label"',
    );
    expect(lines).toHaveLength(2);
    // Addresses are stored lower-case.
    expect(lines[1]).toContain(`"'=hyperlink(""http://x"")`);
    expect(res.text).not.toMatch(/(^|,)"=/m);

    const noted = await api()
      .get('/api/audit')
      .query({ action: 'audit.exported', actor: DEMO_USERS.admin, pageSize: 1 })
      .set(...bearer(admin));
    expect(noted.body.items[0].detail).toMatchObject({ rows: 1 });
  });

  it('cannot be changed or emptied by the application’s database user', async () => {
    await withDatabase(async (db) => {
      const { rows } = await db.query(
        'SELECT current_user AS who, max(id) AS id FROM audit_events',
      );
      expect(rows[0].who).toBe(process.env.PGUSER ?? 'kinpath');
      await expect(
        db.query(`UPDATE audit_events SET action = 'tampered' WHERE id = $1`, [rows[0].id]),
      ).rejects.toThrow(/append-only/);
      await expect(
        db.query('DELETE FROM audit_events WHERE id = $1', [rows[0].id]),
      ).rejects.toThrow(/append-only/);
      await expect(db.query('TRUNCATE audit_events')).rejects.toThrow(/append-only/);
      const after = await db.query('SELECT action FROM audit_events WHERE id = $1', [rows[0].id]);
      expect(after.rows[0].action).not.toBe('tampered');
    });
  });
});
