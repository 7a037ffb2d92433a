import fc from 'fast-check';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, DEMO_USERS, signIn, uniqueEmail } from '../support/api';
import { emptyDemoDir } from '../support/imports';
import { startServer, type TestServer } from '../support/server';

/**
 * Malformed bodies, queries and path values generated for every JSON route of the
 * OpenAPI document: no answer may be 5xx. A server of its own, so the limits and any
 * settings it changes touch no other test.
 */
const FUZZ_RUNS = 2_100;

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';
interface Route {
  method: Method;
  path: string;
  pathParams: string[];
  query: string[];
  bodyFields: string[];
  roles: string[] | 'public' | 'signed-in';
}

let server: TestServer;
let routes: Route[] = [];
const tokens: Record<string, string> = {};
let targetUserId = '';
const counts = { requests: 0, fiveHundreds: 0, byStatus: new Map<number, number>() };

beforeAll(async () => {
  // The shared mail catcher takes the invitation and reset mails the fuzz sets off.
  const shared = JSON.parse(process.env.KINPATH_TEST_SERVER_ENV ?? '{}') as Record<string, string>;
  server = await startServer({
    KINPATH_DEMO_DIR: emptyDemoDir(),
    ...(shared.KINPATH_SMTP_PORT ? { KINPATH_SMTP_PORT: shared.KINPATH_SMTP_PORT } : {}),
  });
  for (const [role, email] of Object.entries(DEMO_USERS)) {
    tokens[role] = await signIn(email, undefined, server.url);
  }
  // A person of its own for PATCH /api/users/:id, so the fuzz never edits the signed-in ones.
  const created = await request(server.url)
    .post('/api/users')
    .set(...bearer(tokens.admin))
    .send({
      email: uniqueEmail('fuzz'),
      displayName: 'Fuzz Target',
      role: 'advisor',
      password: 'a-long-enough-password',
    });
  expect(created.status).toBe(201);
  targetUserId = created.body.id as string;
  routes = await readRoutes();
}, 90_000);

afterAll(async () => {
  await server?.stop();
  const statuses = [...counts.byStatus].sort(([a], [b]) => a - b);
  console.log(
    `route fuzz: ${counts.requests} requests over ${routes.length} routes, 5xx: ${counts.fiveHundreds}; ` +
      statuses.map(([s, n]) => `${s}×${n}`).join(' '),
  );
});

async function readRoutes(): Promise<Route[]> {
  const res = await request(server.url).get('/api/docs-json');
  expect(res.status).toBe(200);
  const doc = res.body as {
    paths: Record<string, Record<string, Record<string, unknown>>>;
    components: { schemas: Record<string, { properties?: Record<string, unknown> }> };
  };
  const found: Route[] = [];
  for (const [path, item] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(item)) {
      const content = (op.requestBody as { content?: Record<string, { schema?: unknown }> })
        ?.content;
      // JSON routes only: uploads have their own fuzz in bad-input.test.ts.
      if (content && !content['application/json']) continue;
      // Signing out would end the session the rest of the run uses.
      if (path === '/api/auth/logout') continue;
      const params = (op.parameters ?? []) as Array<{ in: string; name: string }>;
      const ref = (content?.['application/json']?.schema as { $ref?: string })?.$ref;
      const schema = ref ? doc.components.schemas[ref.split('/').pop() as string] : undefined;
      found.push({
        method: method as Method,
        path,
        pathParams: params.filter((p) => p.in === 'path').map((p) => p.name),
        query: params.filter((p) => p.in === 'query').map((p) => p.name),
        bodyFields: Object.keys(schema?.properties ?? {}),
        roles: op['x-kinpath-public']
          ? 'public'
          : ((op['x-kinpath-roles'] as string[] | undefined) ?? 'signed-in'),
      });
    }
  }
  return found;
}

// --- generators ----------------------------------------------------------------

/** Text that breaks things: NUL, lone surrogates, control and format characters, sizes. */
const nastyText = fc.oneof(
  fc.constantFrom(
    '\u0000',
    'a\u0000b',
    '\ud800',
    'x\udc00y',
    '\ud800@halden.example',
    'advisor@halden.example\u0000',
    '\uffff\ufffe',
    '\u202e\u200b',
    '%',
    '%00',
    '../../etc/passwd',
    "'; DROP TABLE users; --",
    '=cmd|x',
    ' ',
    '',
    'null',
    'NaN',
    '-1',
    '1e309',
    '2025-FA',
    'CMP 2310',
    'HR0000001',
  ),
  fc.string({ maxLength: 40 }),
  fc.string({ unit: 'binary', maxLength: 20 }),
  fc.integer({ min: 1, max: 20_000 }).map((n) => 'x'.repeat(n)),
);

const nastyValue: fc.Arbitrary<unknown> = fc.oneof(
  nastyText,
  fc.constantFrom(null, true, false, 0, -1, 1.5, 1e308, -0, Number.MAX_SAFE_INTEGER + 2),
  fc.integer(),
  fc.array(nastyText, { maxLength: 4 }),
  fc.dictionary(nastyText, nastyText, { maxKeys: 3 }),
  fc.object({ maxDepth: 2 }),
);

const deep = fc
  .integer({ min: 40, max: 4000 })
  .chain((n) =>
    fc.constantFrom(
      '['.repeat(n) + ']'.repeat(n),
      '{"a":'.repeat(n) + '1' + '}'.repeat(n),
      '['.repeat(n),
    ),
  );

function bodyFor(route: Route): fc.Arbitrary<string> {
  const fieldNames = route.bodyFields.length
    ? fc.oneof(fc.constantFrom(...route.bodyFields), nastyText)
    : nastyText;
  return fc.oneof(
    { weight: 5, arbitrary: fc.dictionary(fieldNames, nastyValue, { maxKeys: 6 }).map(json) },
    { weight: 2, arbitrary: fc.json({ maxDepth: 4 }) },
    { weight: 1, arbitrary: fc.string({ maxLength: 60 }) },
    { weight: 1, arbitrary: deep },
    {
      weight: 1,
      arbitrary: fc.constantFrom('{"__proto__":{"admin":true}}', '\u0000', '', '{"a":1}{"b":2}'),
    },
  );
}

/** JSON.stringify writes a lone surrogate as its escape, so it reaches the parser as one. */
function json(value: unknown): string {
  return JSON.stringify(value) ?? 'null';
}

/** A query value, percent-encoded by hand so broken UTF-8 and NUL travel as they are. */
const queryValue = fc.oneof(
  nastyText.map((s) => {
    try {
      // Short enough that Node's header limit (431, before the server) is not what answers.
      return encodeURIComponent(s.slice(0, 1000));
    } catch {
      return '%ED%A0%80'; // a lone surrogate in UTF-8 form
    }
  }),
  fc.constantFrom('%00', '%ED%A0%80', '%E0%A4%A', '%FF', 'a%00b', '1e999', '-5', '9999999999'),
);

function pathValue(): fc.Arbitrary<string> {
  return fc.oneof(
    fc.constant(targetUserId),
    fc.uuid(),
    fc.constantFrom('1', '0', '-1', 'null', '%00', 'a%00b', '%ED%A0%80', '%E0%A4%A', 'CMP%202310'),
    nastyText.map((s) => {
      try {
        return encodeURIComponent(s.slice(0, 200));
      } catch {
        return '%ED%A0%80';
      }
    }),
  );
}

const requestArb = fc.integer({ min: 0, max: 10_000 }).chain((i) => {
  const route = routes[i % routes.length];
  const params = fc.tuple(...route.pathParams.map(() => pathValue()));
  const queryNames = fc.oneof(
    route.query.length ? fc.constantFrom(...route.query) : fc.constant('q'),
    fc.constantFrom('q', 'page', 'term', '__proto__'),
  );
  const query = fc.array(fc.tuple(queryNames, queryValue), { maxLength: 4 });
  const body =
    route.method === 'get' || route.method === 'delete'
      ? fc.constant(undefined)
      : fc.option(bodyFor(route), { nil: undefined, freq: 8 });
  const type = fc.constantFrom('application/json', 'application/json; charset=utf-8', 'text/plain');
  return fc.record({ route: fc.constant(route), params, query, body, type });
});

function tokenFor(route: Route): string | undefined {
  if (route.roles === 'public') return undefined;
  const role = route.roles === 'signed-in' ? 'advisor' : route.roles[0];
  return tokens[role];
}

async function send(
  route: Route,
  params: string[],
  query: Array<[string, string]>,
  body: string | undefined,
  type: string,
): Promise<request.Response> {
  let path = route.path;
  route.pathParams.forEach((name, i) => (path = path.replace(`{${name}}`, params[i])));
  const search = query.map(([k, v]) => `${encodeURIComponent(k)}=${v}`).join('&');
  const url = search ? `${path}?${search}` : path;
  let req = request(server.url)[route.method](url);
  const token = tokenFor(route);
  if (token) req = req.set(...bearer(token));
  if (body !== undefined) req = req.set('Content-Type', type);
  const res = body === undefined ? await req : await req.send(body);
  counts.requests++;
  counts.byStatus.set(res.status, (counts.byStatus.get(res.status) ?? 0) + 1);
  if (res.status >= 500) counts.fiveHundreds++;
  return res;
}

function expectNoServerError(res: request.Response, what: string) {
  expect(res.status, `${what} → ${res.text.slice(0, 300)}`).toBeLessThan(500);
  if (res.status >= 400) {
    expect(res.body).toMatchObject({ statusCode: res.status, error: expect.any(String) });
  }
}

// --- tests -------------------------------------------------------------------------

describe('inputs that used to fail on the server', () => {
  it('refuses JSON nested 3,000 deep with 400 before parsing it', async () => {
    for (const raw of [
      '['.repeat(3000) + ']'.repeat(3000),
      '{"a":'.repeat(3000) + '1' + '}'.repeat(3000),
    ]) {
      const res = await request(server.url)
        .post('/api/auth/login')
        .set('Content-Type', 'application/json')
        .send(raw);
      expect(res.status, res.text.slice(0, 200)).toBe(400);
      expect(res.body.message).toMatch(/nested too deeply/);
    }
  });

  it('refuses a NUL character in a body field or a query with 400', async () => {
    const login = await request(server.url)
      .post('/api/auth/login')
      .send({ email: 'advisor@halden.example\u0000', password: 'x' });
    expect(login.status).toBe(400);
    expect(login.body.message).toMatch(/NUL/);
    const audit = await request(server.url)
      .get('/api/audit?actor=a%00b')
      .set(...bearer(tokens.admin));
    expect(audit.status).toBe(400);
  });

  it('refuses a lone surrogate in an e-mail field with 400', async () => {
    for (const path of ['/api/auth/password-reset', '/api/auth/login']) {
      const res = await request(server.url)
        .post(path)
        .set('Content-Type', 'application/json')
        .send('{"email":"\\ud800@halden.example","password":"x"}');
      expect(res.status, `${path}: ${res.text}`).toBe(400);
    }
  });

  it('refuses a null display name with 400 and keeps the name', async () => {
    const res = await request(server.url)
      .patch(`/api/users/${targetUserId}`)
      .set(...bearer(tokens.admin))
      .send({ displayName: null });
    expect(res.status, res.text).toBe(400);
    for (const field of ['role', 'active']) {
      const other = await request(server.url)
        .patch(`/api/users/${targetUserId}`)
        .set(...bearer(tokens.admin))
        .send({ [field]: null });
      expect(other.status, `${field}: ${other.text}`).toBe(400);
    }
  });
});

describe('every JSON route of the API document', () => {
  it(`answers ${FUZZ_RUNS} malformed requests without a 5xx`, async () => {
    expect(routes.length).toBeGreaterThan(30);
    await fc.assert(
      fc.asyncProperty(requestArb, async ({ route, params, query, body, type }) => {
        const res = await send(route, params, query, body, type);
        expectNoServerError(res, `${route.method.toUpperCase()} ${route.path}`);
      }),
      { numRuns: FUZZ_RUNS, seed: 20261204 },
    );
    // Every route was tried, and the server is still up.
    expect((await request(server.url).get('/api/health')).status).toBe(200);
    expect(counts.requests).toBeGreaterThanOrEqual(FUZZ_RUNS);
    expect(counts.fiveHundreds).toBe(0);
  }, 180_000);
});
