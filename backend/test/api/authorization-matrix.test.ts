import { API_TOKEN_SCOPES, type ApiTokenScope, ROLES, type Role } from '@kinpath/contracts';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, DEMO_PASSWORD, DEMO_USERS, signIn } from '../support/api';
import { emptyDemoDir } from '../support/imports';
import { startServer, type TestServer } from '../support/server';

/**
 * Who may call each route, as api.md says. Every operation of the OpenAPI document
 * must have a line here, and its `x-kinpath-roles` must agree, so a new route
 * cannot ship without a decision on who may use it.
 */
type Access = 'public' | 'signed-in' | readonly Role[];
interface Rule {
  access: Access;
  /** A department head may ask for their own department only (`?department=`). */
  departmentScoped?: boolean;
  /** The script token scope that opens the route; without one, every script token gets 403. */
  scope?: ApiTokenScope;
}

const REGISTRAR: readonly Role[] = ['registrar'];
const ADVISING: readonly Role[] = ['advisor', 'registrar'];
const ADVISOR: readonly Role[] = ['advisor'];
const ADMIN: readonly Role[] = ['admin'];
const OUTLOOK: readonly Role[] = ['department_head', 'registrar'];

export const ACCESS: Record<string, Rule> = {
  'GET /api/health': { access: 'public' },
  'POST /api/auth/login': { access: 'public' },
  'GET /api/auth/me': { access: 'signed-in' },
  'POST /api/auth/refresh': { access: 'signed-in' },
  'POST /api/auth/logout': { access: 'signed-in' },
  'POST /api/auth/invitations/accept': { access: 'public' },
  'POST /api/auth/invitations/check': { access: 'public' },
  'POST /api/auth/password-reset/check': { access: 'public' },
  'POST /api/auth/password-reset': { access: 'public' },
  'POST /api/auth/password-reset/confirm': { access: 'public' },

  'GET /api/users': { access: ADMIN },
  'POST /api/users': { access: ADMIN },
  'PATCH /api/users/{id}': { access: ADMIN },
  'POST /api/users/{id}/invitation': { access: ADMIN },
  'DELETE /api/users/{id}/invitation': { access: ADMIN },

  'GET /api/departments': { access: 'signed-in' },
  'POST /api/departments': { access: ADMIN },
  'DELETE /api/departments/{code}': { access: ADMIN },

  'GET /api/audit': { access: ['admin', 'registrar'] },

  'GET /api/api-tokens': { access: ['admin', 'registrar'] },
  'POST /api/api-tokens': { access: ['admin', 'registrar'] },
  'POST /api/api-tokens/{id}/revoke': { access: ['admin', 'registrar'] },

  'POST /api/imports': { access: REGISTRAR, scope: 'imports:write' },
  'POST /api/imports/preview': { access: REGISTRAR, scope: 'imports:write' },
  'GET /api/imports/mappings': { access: REGISTRAR, scope: 'imports:read' },
  'POST /api/imports/mappings': { access: REGISTRAR, scope: 'imports:write' },
  'GET /api/imports': { access: REGISTRAR, scope: 'imports:read' },
  'GET /api/imports/{id}': { access: REGISTRAR, scope: 'imports:read' },
  'GET /api/imports/{id}/errors': { access: REGISTRAR, scope: 'imports:read' },
  'POST /api/imports/{id}/commit': { access: REGISTRAR, scope: 'imports:write' },
  'POST /api/imports/{id}/rollback': { access: REGISTRAR, scope: 'imports:write' },
  'POST /api/imports/{id}/discard': { access: REGISTRAR, scope: 'imports:write' },
  'POST /api/imports/{id}/check-again': { access: REGISTRAR, scope: 'imports:write' },
  'GET /api/imports/{id}/rejected-rows': { access: REGISTRAR, scope: 'imports:read' },
  'GET /api/imports/{id}/preview': { access: REGISTRAR, scope: 'imports:read' },

  'GET /api/courses': { access: 'signed-in', scope: 'courses:read' },
  'GET /api/terms': { access: 'signed-in', scope: 'terms:read' },
  'GET /api/grade-scale': { access: 'signed-in' },
  'PUT /api/grade-scale': { access: REGISTRAR },

  'GET /api/model/settings': { access: 'signed-in' },
  'PUT /api/model/settings': { access: REGISTRAR },
  'GET /api/model/settings/versions': { access: REGISTRAR },
  'POST /api/model/settings/versions/{version}/restore': { access: REGISTRAR },
  'POST /api/model/evaluations': { access: REGISTRAR },
  'GET /api/model/evaluations': { access: REGISTRAR },
  'GET /api/model/evaluations/{id}': { access: REGISTRAR },

  'POST /api/students/lookup': { access: ADVISING },
  'GET /api/students/recent': { access: ADVISING },
  'GET /api/students/{ref}': { access: ADVISING },
  'GET /api/students/{ref}/history': { access: ADVISING },
  'GET /api/students/{ref}/electives': { access: ADVISING },
  'GET /api/students/{ref}/electives/{courseCode}/explanation': { access: ADVISING },
  'GET /api/students/{ref}/notes': { access: ADVISOR },
  'POST /api/students/{ref}/notes': { access: ADVISOR },
  'PATCH /api/students/{ref}/notes/{id}': { access: ADVISOR },
  'DELETE /api/students/{ref}/notes/{id}': { access: ADVISOR },
  'GET /api/students/{ref}/summaries': { access: ADVISOR },
  'GET /api/students/{ref}/shortlist': { access: ADVISOR },
  'PUT /api/students/{ref}/shortlist': { access: ADVISOR },
  'POST /api/students/{ref}/summary': { access: ADVISOR },

  'GET /api/forecasts': { access: OUTLOOK, departmentScoped: true, scope: 'forecasts:read' },
  'GET /api/forecasts/backtest': {
    access: OUTLOOK,
    departmentScoped: true,
    scope: 'forecasts:read',
  },
  'GET /api/forecasts/export': { access: OUTLOOK, departmentScoped: true, scope: 'forecasts:read' },
  'GET /api/forecasts/about': { access: OUTLOOK, scope: 'forecasts:read' },
  'GET /api/forecasts/runs': { access: REGISTRAR },
  'POST /api/forecasts/runs': { access: REGISTRAR },
};

/** Plausible values for path parameters: well-formed, naming nothing that exists. */
const PARAMS: Record<string, string> = {
  id: '6f1c2a0e-8d4b-4c7a-9e21-3b5d7f9a1c2e',
  ref: 'AbCdEfGhIjKlMnOp',
  courseCode: 'CMP 2310',
  version: '1',
};

const METHODS = ['get', 'post', 'put', 'patch', 'delete'] as const;
type Identity = 'anonymous' | Role | 'other_head';
const IDENTITIES: Identity[] = ['anonymous', ...ROLES, 'other_head'];

interface Operation {
  method: (typeof METHODS)[number];
  path: string;
  key: string;
  documentedRoles: string[] | undefined;
  documentedPublic: boolean;
  documentedScopes: string[] | undefined;
}

let server: TestServer;
let operations: Operation[];
const tokens = new Map<Identity, string>();
/** A registrar's script token holding every scope. */
let scriptToken: string;

beforeAll(async () => {
  const shared = JSON.parse(process.env.KINPATH_TEST_SERVER_ENV ?? '{}') as Record<string, string>;
  server = await startServer({
    KINPATH_DEMO_DIR: emptyDemoDir(),
    ...(shared.KINPATH_SMTP_PORT ? { KINPATH_SMTP_PORT: shared.KINPATH_SMTP_PORT } : {}),
  });
  const doc = await request(server.url).get('/api/docs-json');
  expect(doc.status).toBe(200);
  operations = [];
  for (const [path, item] of Object.entries(
    doc.body.paths as Record<string, Record<string, unknown>>,
  )) {
    for (const method of METHODS) {
      const op = item[method] as Record<string, unknown> | undefined;
      if (!op) continue;
      operations.push({
        method,
        path,
        key: `${method.toUpperCase()} ${path}`,
        documentedRoles: op['x-kinpath-roles'] as string[] | undefined,
        documentedPublic: op['x-kinpath-public'] === true,
        documentedScopes: op['x-kinpath-token-scopes'] as string[] | undefined,
      });
    }
  }
  for (const role of ROLES)
    tokens.set(role, await signIn(DEMO_USERS[role], DEMO_PASSWORD, server.url));
  const admin = tokens.get('admin')!;
  const otherHead = { email: 'head.mth@halden.example', password: 'bramble-harbour-lantern-5' };
  // No catalogue on this server: the head's department is added by hand first.
  await request(server.url)
    .post('/api/departments')
    .set(...bearer(admin))
    .send({ code: 'MTH' })
    .expect(201);
  const created = await request(server.url)
    .post('/api/users')
    .set(...bearer(admin))
    .send({
      ...otherHead,
      displayName: 'Head of Mathematics',
      role: 'department_head',
      department: 'MTH',
    });
  expect(created.status, created.text).toBe(201);
  tokens.set('other_head', await signIn(otherHead.email, otherHead.password, server.url));
  const script = await request(server.url)
    .post('/api/api-tokens')
    .set(...bearer(tokens.get('registrar')!))
    .send({
      name: 'Matrix script',
      scopes: [...API_TOKEN_SCOPES],
      expiresOn: new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10),
    });
  expect(script.status, script.text).toBe(201);
  scriptToken = script.body.secret as string;
}, 90_000);

afterAll(async () => {
  await server?.stop();
});

function expected(rule: Rule, who: Identity): 'open' | 401 | 403 {
  if (rule.access === 'public') return 'open';
  if (who === 'anonymous') return 401;
  if (rule.access === 'signed-in') return 'open';
  const role: Role = who === 'other_head' ? 'department_head' : who;
  if (!rule.access.includes(role)) return 403;
  // The head of another department asks for CMP's figures: refused, not an empty list.
  if (rule.departmentScoped && who === 'other_head') return 403;
  return 'open';
}

async function call(op: Operation, who: Identity, rule: Rule, asToken?: string) {
  const path = op.path.replace(/\{(\w+)\}/g, (_, name: string) =>
    encodeURIComponent(PARAMS[name] ?? 'x'),
  );
  // Signing out would end the session the other calls use; it gets a session of its own.
  let token = who === 'anonymous' ? undefined : (asToken ?? tokens.get(who));
  if (op.key === 'POST /api/auth/logout' && who !== 'anonymous' && !asToken) {
    const email = who === 'other_head' ? 'head.mth@halden.example' : DEMO_USERS[who];
    const password = who === 'other_head' ? 'bramble-harbour-lantern-5' : DEMO_PASSWORD;
    token = await signIn(email, password, server.url);
  }
  let req = request(server.url)[op.method](path);
  if (rule.departmentScoped) req = req.query({ department: 'CMP' });
  if (token) req = req.set(...bearer(token));
  // An empty body: allowed callers get a validation answer, nothing is changed.
  if (op.method !== 'get' && op.method !== 'delete') req = req.send({});
  return req.timeout(15_000);
}

describe('authorization matrix', () => {
  it('has an access rule for every documented route, agreeing with x-kinpath-roles', () => {
    const missing = operations.filter((op) => !ACCESS[op.key]).map((op) => op.key);
    expect(missing, 'routes without an entry in the access table').toEqual([]);
    for (const op of operations) {
      const rule = ACCESS[op.key];
      if (rule.access === 'public') {
        expect(op.documentedPublic, `${op.key} should be public`).toBe(true);
      } else {
        expect(op.documentedPublic, `${op.key} should not be public`).toBe(false);
        const roles = rule.access === 'signed-in' ? undefined : [...rule.access].sort();
        expect(op.documentedRoles ? [...op.documentedRoles].sort() : undefined, op.key).toEqual(
          roles,
        );
      }
      expect(op.documentedScopes, `${op.key} script token scopes`).toEqual(
        rule.scope ? [rule.scope] : undefined,
      );
    }
    expect(operations.length).toBeGreaterThan(20);
  });

  it('answers every route as api.md allows, for anonymous, each role and another department’s head', async () => {
    const failures: string[] = [];
    let calls = 0;
    for (const op of operations) {
      const rule = ACCESS[op.key];
      if (!rule) continue;
      for (const who of IDENTITIES) {
        const res = await call(op, who, rule);
        calls++;
        const want = expected(rule, who);
        const got = res.status;
        const ok = want === 'open' ? got !== 401 && got !== 403 && got < 500 : got === want;
        if (!ok)
          failures.push(
            `${op.key} as ${who}: expected ${want}, got ${got} ${res.text.slice(0, 120)}`,
          );
        if (got === 401 || got === 403) {
          expect(res.body).toMatchObject({ statusCode: got, message: expect.any(String) });
        }
      }
    }
    expect(failures).toEqual([]);
    expect(calls).toBe(operations.length * IDENTITIES.length);
    console.log(
      `authorization matrix: ${operations.length} routes × ${IDENTITIES.length} callers = ${calls} calls`,
    );
  }, 120_000);

  it('lets a script token with every scope through only where a scope opens the route and the owner’s role fits', async () => {
    const failures: string[] = [];
    for (const op of operations) {
      const rule = ACCESS[op.key];
      if (!rule || rule.access === 'public') continue;
      const res = await call(op, 'registrar', rule, scriptToken);
      const opens = rule.scope !== undefined && expected(rule, 'registrar') === 'open';
      const got = res.status;
      const ok = opens ? got !== 401 && got !== 403 && got < 500 : got === 403;
      if (!ok) failures.push(`${op.key}: expected ${opens ? 'open' : 403}, got ${got}`);
    }
    expect(failures).toEqual([]);
  }, 120_000);
});
