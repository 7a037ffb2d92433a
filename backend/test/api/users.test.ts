import { beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, uniqueEmail } from '../support/api';

let admin: string;
beforeAll(async () => {
  admin = await signIn(DEMO_USERS.admin);
});

describe('users, by role', () => {
  it('answers 403 to an advisor listing users', async () => {
    const advisor = await signIn(DEMO_USERS.advisor);
    const res = await api()
      .get('/api/users')
      .set(...bearer(advisor));
    expect(res.status).toBe(403);
    expect(res.body).toMatchObject({ statusCode: 403, error: 'Forbidden' });
  });

  it('answers 403 to registrar staff and department heads too', async () => {
    for (const email of [DEMO_USERS.registrar, DEMO_USERS.department_head]) {
      const token = await signIn(email);
      expect(
        (
          await api()
            .get('/api/users')
            .set(...bearer(token))
        ).status,
      ).toBe(403);
      const create = await api()
        .post('/api/users')
        .set(...bearer(token))
        .send({
          email: uniqueEmail('x'),
          displayName: 'X',
          role: 'admin',
          password: 'long-enough-pass',
        });
      expect(create.status).toBe(403);
    }
  });

  it('answers 401 without a token', async () => {
    expect((await api().get('/api/users')).status).toBe(401);
  });

  it('lists every demo account for an admin, without password hashes', async () => {
    const res = await api()
      .get('/api/users')
      .set(...bearer(admin));
    expect(res.status).toBe(200);
    const emails = (res.body as Array<{ email: string }>).map((u) => u.email);
    expect(emails).toEqual(expect.arrayContaining(Object.values(DEMO_USERS)));
    expect(res.text).not.toMatch(/password|\$2[aby]\$/i);
  });
});

describe('creating users', () => {
  it('creates an account that can sign in at once', async () => {
    const email = uniqueEmail('Registrar.Two').toUpperCase();
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({ email, displayName: 'Registrar Two', role: 'registrar', password: 'twelve-chars' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      email: email.toLowerCase(),
      role: 'registrar',
      department: null,
      active: true,
      pendingInvitation: false,
      notice: null,
    });
    expect(await signIn(email.toLowerCase(), 'twelve-chars')).toEqual(expect.any(String));
  });

  it('refuses a password shorter than 12 characters with a clear 400', async () => {
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: uniqueEmail('short'),
        displayName: 'Short',
        role: 'advisor',
        password: 'elevenchars',
      });
    expect(res.status).toBe(400);
    expect(res.body.message).toContain('Password must be at least 12 characters.');
  });

  it('answers 409 for an e-mail address already in use, whatever its case', async () => {
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: 'ADVISOR@halden.example',
        displayName: 'Twin',
        role: 'advisor',
        password: 'long-enough-pass',
      });
    expect(res.status).toBe(409);
    expect(res.body).toMatchObject({ statusCode: 409, error: 'Conflict' });
  });

  it('refuses a department head without a department', async () => {
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: uniqueEmail('head'),
        displayName: 'Head',
        role: 'department_head',
        password: 'long-enough-pass',
      });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/department/i);
  });

  it('refuses a department that is not a short code', async () => {
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: uniqueEmail('head'),
        displayName: 'Head',
        role: 'department_head',
        department: 'Computing and Data',
        password: 'long-enough-pass',
      });
    expect(res.status).toBe(400);
  });

  it('refuses a department code that is on no list, with a 400 that says what to do', async () => {
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: uniqueEmail('head.xyz'),
        displayName: 'Head of nothing',
        role: 'department_head',
        department: 'XYZ',
        password: 'long-enough-pass',
      });
    expect(res.status).toBe(400);
    expect(res.body.message).toBe(
      'XYZ is not a department of the catalogue. Choose one from the list, or add it under Departments first.',
    );
    const list = await api()
      .get('/api/users')
      .set(...bearer(admin));
    expect(list.body.some((u: { department: string | null }) => u.department === 'XYZ')).toBe(
      false,
    );
  });

  it('refuses moving a head to an unknown department', async () => {
    const list = await api()
      .get('/api/users')
      .set(...bearer(admin));
    const head = list.body.find((u: { email: string }) => u.email === DEMO_USERS.department_head);
    const res = await api()
      .patch(`/api/users/${head.id}`)
      .set(...bearer(admin))
      .send({ department: 'QQQ' });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/^QQQ is not a department of the catalogue/);
  });

  it('creates a head of a department', async () => {
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: uniqueEmail('head.eco'),
        displayName: 'Head of Economics',
        role: 'department_head',
        department: 'eco',
        password: 'long-enough-pass',
      });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ role: 'department_head', department: 'ECO' });
  });

  it('creates an inactive account pending invitation when no password is given, and says so', async () => {
    const email = uniqueEmail('invitee');
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({ email, displayName: 'Invitee', role: 'advisor' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ active: false, pendingInvitation: true });
    expect(res.body.notice).toMatch(/invitation/);
    const activate = await api()
      .patch(`/api/users/${res.body.id}`)
      .set(...bearer(admin))
      .send({ active: true });
    expect(activate.status).toBe(400);
  });

  it('refuses unknown fields and roles', async () => {
    const res = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: uniqueEmail('x'),
        displayName: 'X',
        role: 'dean',
        password: 'long-enough-pass',
        isAdmin: true,
      });
    expect(res.status).toBe(400);
    expect(res.body.message).toEqual(
      expect.arrayContaining([
        'property isAdmin should not exist',
        expect.stringMatching(/^Role must be one of/),
      ]),
    );
  });
});

describe('changing users', () => {
  it('applies a role change on the next request with the same token', async () => {
    const email = uniqueEmail('promoted');
    const created = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({ email, displayName: 'Promoted', role: 'advisor', password: 'long-enough-pass' });
    const token = await signIn(email, 'long-enough-pass');
    expect(
      (
        await api()
          .get('/api/users')
          .set(...bearer(token))
      ).status,
    ).toBe(403);

    const promote = await api()
      .patch(`/api/users/${created.body.id}`)
      .set(...bearer(admin))
      .send({ role: 'admin' });
    expect(promote.status).toBe(200);
    expect(
      (
        await api()
          .get('/api/users')
          .set(...bearer(token))
      ).status,
    ).toBe(200);

    const demote = await api()
      .patch(`/api/users/${created.body.id}`)
      .set(...bearer(admin))
      .send({ role: 'department_head', department: 'MTH', displayName: 'Head of Mathematics' });
    expect(demote.status).toBe(200);
    expect(demote.body).toMatchObject({
      role: 'department_head',
      department: 'MTH',
      displayName: 'Head of Mathematics',
    });
    expect(
      (
        await api()
          .get('/api/users')
          .set(...bearer(token))
      ).status,
    ).toBe(403);
    expect(
      (
        await api()
          .get('/api/auth/me')
          .set(...bearer(token))
      ).body.role,
    ).toBe('department_head');
  });

  it('answers 404 for an unknown account', async () => {
    const unknown = await api()
      .patch('/api/users/00000000-0000-4000-8000-000000000000')
      .set(...bearer(admin))
      .send({ displayName: 'Ghost' });
    expect(unknown.status).toBe(404);
    const malformed = await api()
      .patch('/api/users/42')
      .set(...bearer(admin))
      .send({ displayName: 'Ghost' });
    expect(malformed.status).toBe(404);
  });
});

describe('departments', () => {
  it('lists the catalogue’s departments to anyone signed in', async () => {
    const advisor = await signIn(DEMO_USERS.advisor);
    const res = await api()
      .get('/api/departments')
      .set(...bearer(advisor));
    expect(res.status).toBe(200);
    const cmp = res.body.find((d: { code: string }) => d.code === 'CMP');
    expect(cmp).toMatchObject({ code: 'CMP', added: false });
    expect(cmp.courses).toBeGreaterThan(0);
    expect(cmp.heads).toBeGreaterThanOrEqual(1);
  });

  it('lets an admin add a department, scope a head to it, and remove it only once unused', async () => {
    const code = `Q${Math.random()
      .toString(36)
      .replace(/[^a-z]/g, '')
      .slice(0, 4)
      .toUpperCase()}`;
    const added = await api()
      .post('/api/departments')
      .set(...bearer(admin))
      .send({ code: code.toLowerCase(), name: 'Quiet Studies' });
    expect(added.status).toBe(201);
    expect(added.body).toEqual({ code, name: 'Quiet Studies', courses: 0, added: true, heads: 0 });
    const again = await api()
      .post('/api/departments')
      .set(...bearer(admin))
      .send({ code });
    expect(again.status).toBe(409);
    const catalogue = await api()
      .post('/api/departments')
      .set(...bearer(admin))
      .send({ code: 'CMP' });
    expect(catalogue.status).toBe(409);

    const head = await api()
      .post('/api/users')
      .set(...bearer(admin))
      .send({
        email: uniqueEmail('head.q'),
        displayName: 'Head of Quiet Studies',
        role: 'department_head',
        department: code,
        password: 'long-enough-pass',
      });
    expect(head.status).toBe(201);
    const inUse = await api()
      .delete(`/api/departments/${code}`)
      .set(...bearer(admin));
    expect(inUse.status).toBe(409);

    await api()
      .patch(`/api/users/${head.body.id}`)
      .set(...bearer(admin))
      .send({ role: 'advisor' })
      .expect(200);
    await api()
      .delete(`/api/departments/${code}`)
      .set(...bearer(admin))
      .expect(204);
    const after = await api()
      .get('/api/departments')
      .set(...bearer(admin));
    expect(after.body.some((d: { code: string }) => d.code === code)).toBe(false);
  });

  it('keeps the catalogue’s departments and refuses other roles', async () => {
    await api()
      .delete('/api/departments/CMP')
      .set(...bearer(admin))
      .expect(404);
    const registrar = await signIn(DEMO_USERS.registrar);
    await api()
      .post('/api/departments')
      .set(...bearer(registrar))
      .send({ code: 'ZZZ' })
      .expect(403);
  });
});
