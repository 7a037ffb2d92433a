#!/usr/bin/env node
// Load: 50 signed-in users at once for 60 s on loopback, mixing student lookups,
// electives and demand outlooks (whichever of those routes the server has), against
// a running server with the demo data. Prints requests, errors, p50/p95/p99.
//
//   node backend/bench/load.bench.mjs http://127.0.0.1:3341 [--users 50] [--seconds 60]
//                                     [--students .data/dev/demo/students.csv]
//
// Every user signs in with a session of their own (demo accounts: advisors look up
// students and read electives, department heads read their outlook, registrar staff
// do all three). Exits non-zero when any request failed.
import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { resolve } from 'node:path';

const require = createRequire(import.meta.url);
const autocannon = require('autocannon');

const args = process.argv.slice(2);
const option = (name, fallback) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : fallback;
};
const base = (args.find((a) => /^https?:\/\//.test(a)) ?? '').replace(/\/$/, '');
if (!base) {
  console.error(
    'Usage: node backend/bench/load.bench.mjs <server URL> [--users 50] [--seconds 60]',
  );
  process.exit(2);
}
const USERS = Number(option('--users', '50'));
const SECONDS = Number(option('--seconds', '60'));
const PASSWORD = option('--password', 'kinpath-demo-2026');
const repo = resolve(import.meta.dirname, '..', '..');
const studentsFile = [
  option('--students', ''),
  join(repo, '.data', 'dev', 'demo', 'students.csv'),
  join(repo, '.data', 'test', 'demo', 'students.csv'),
  join(repo, '.data', 'demo', 'students.csv'),
].find((f) => f && existsSync(f));

function join(...parts) {
  return resolve(...parts);
}

async function api(method, path, token, body) {
  const res = await fetch(`${base}${path}`, {
    method,
    headers: {
      'Content-Type': 'application/json',
      ...(token ? { Authorization: `Bearer ${token}` } : {}),
    },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  return { status: res.status, body: text ? JSON.parse(text) : null };
}

async function signIn(email) {
  const res = await api('POST', '/api/auth/login', undefined, { email, password: PASSWORD });
  if (res.status !== 200) throw new Error(`sign-in as ${email}: ${res.status}`);
  return res.body.accessToken;
}

// --- what the server offers ------------------------------------------------------
const doc = await api('GET', '/api/docs-json');
const paths = Object.keys(doc.body?.paths ?? {});
const has = {
  lookups: paths.includes('/api/students/lookup'),
  electives: paths.includes('/api/students/{ref}/electives'),
  forecasts: paths.includes('/api/forecasts'),
};
for (const [name, present] of Object.entries(has)) {
  if (!present) console.log(`load: the server has no ${name} route; skipped.`);
}
if (!has.lookups && !has.forecasts) {
  console.error('load: nothing to load (no lookup and no forecast route).');
  process.exit(2);
}

// --- data for the requests ---------------------------------------------------------
const registrar = await signIn('registrar@halden.example');
const terms = (await api('GET', '/api/terms', registrar)).body;
const nextTerm = terms?.next ?? terms?.current ?? null;
let studentIds = [];
if (has.lookups) {
  if (!studentsFile) throw new Error('No demo students.csv found: pass --students <file>.');
  studentIds = readFileSync(studentsFile, 'utf8')
    .split(/\r?\n/)
    .slice(1)
    .map((line) => line.split(',')[0])
    .filter(Boolean)
    .slice(0, 400);
}
const refs = [];
if (has.electives) {
  for (const studentId of studentIds.slice(0, 100)) {
    const res = await api('POST', '/api/students/lookup', registrar, { studentId });
    if (res.status === 200) refs.push(res.body.ref);
  }
}
const pick = (list) => list[Math.floor(Math.random() * list.length)];
const termQuery = nextTerm ? `?term=${encodeURIComponent(nextTerm)}` : '';

const LOOKUP = {
  method: 'POST',
  path: '/api/students/lookup',
  setupRequest: (req) => ({ ...req, body: JSON.stringify({ studentId: pick(studentIds) }) }),
};
const ELECTIVES = {
  method: 'GET',
  setupRequest: (req) => ({ ...req, path: `/api/students/${pick(refs)}/electives${termQuery}` }),
};
const FORECASTS = {
  method: 'GET',
  path: `/api/forecasts${termQuery}${termQuery ? '&' : '?'}department=CMP`,
};

const advisorWork = [has.lookups && LOOKUP, has.electives && refs.length && ELECTIVES].filter(
  Boolean,
);
const headWork = [has.forecasts && FORECASTS].filter(Boolean);
const registrarWork = [...advisorWork, ...headWork];
const roles = [
  { email: 'advisor@halden.example', work: advisorWork },
  { email: 'head.cmp@halden.example', work: headWork },
  { email: 'registrar@halden.example', work: registrarWork },
].filter((r) => r.work.length > 0);

// One session per simulated user.
const users = [];
for (let i = 0; i < USERS; i++) {
  const role = roles[i % roles.length];
  users.push({ token: await signIn(role.email), work: role.work });
}

// --- the run -----------------------------------------------------------------------
const latencies = [];
const statuses = new Map();
let connection = 0;
const instance = autocannon({
  url: base,
  connections: USERS,
  duration: SECONDS,
  timeout: 10,
  headers: { 'Content-Type': 'application/json' },
  requests: [{ method: 'GET', path: '/api/health' }],
  setupClient: (client) => {
    const user = users[connection++ % users.length];
    client.setHeaders({
      'Content-Type': 'application/json',
      Authorization: `Bearer ${user.token}`,
    });
    // Each user cycles through a shuffled mix of their work.
    const mix = [...user.work, ...user.work, ...user.work].sort(() => Math.random() - 0.5);
    client.setRequests(mix);
  },
});
instance.on('response', (_client, statusCode, _bytes, responseTime) => {
  latencies.push(responseTime);
  statuses.set(statusCode, (statuses.get(statusCode) ?? 0) + 1);
});
const result = await new Promise((resolveRun, reject) =>
  instance.once('done', resolveRun).once('error', reject),
);

latencies.sort((a, b) => a - b);
const percentile = (p) =>
  latencies.length
    ? latencies[Math.min(latencies.length - 1, Math.ceil((p / 100) * latencies.length) - 1)]
    : NaN;
const failed = result.non2xx + result.errors + result.timeouts;
const mixNames = Object.entries(has)
  .filter(([, present]) => present)
  .map(([name]) => name)
  .join(', ');
console.log(`load: ${USERS} users, ${SECONDS} s, mix of ${mixNames}, against ${base}`);
console.log(
  `load: ${result.requests.total} requests (${Math.round(result.requests.average)}/s), errors ${failed} (non-2xx ${result.non2xx}, socket errors ${result.errors}, timeouts ${result.timeouts})`,
);
console.log(
  `load: latency p50 ${percentile(50).toFixed(1)} ms, p95 ${percentile(95).toFixed(1)} ms, p99 ${percentile(99).toFixed(1)} ms, max ${latencies.at(-1)?.toFixed(1)} ms`,
);
console.log(`load: status codes ${JSON.stringify(Object.fromEntries(statuses))}`);
process.exit(failed > 0 ? 1 : 0);
