#!/usr/bin/env node
// Electives latency: advisors asking for one student's electives list at once,
// against a running server with the Halden Reach demo loaded. Signs in as the
// demo advisor, looks up a few demo students, then drives
// GET /api/students/:ref/electives with autocannon and prints p50/p95/p99 and
// requests per second. The target is p95 <= 150 ms with 20 concurrent advisors.
//
//   node backend/bench/electives.bench.mjs [--url http://127.0.0.1:3000] [--connections 20]
//       [--duration 20] [--students 25] [--demo-dir DIR]
//
// DIR holds the demo's students.csv (the raw student numbers the advisor types);
// default KINPATH_DEMO_DIR, else .data/start/demo, else .data/test/demo.
import autocannon from 'autocannon';
import { existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parseArgs } from 'node:util';

const repoRoot = resolve(import.meta.dirname, '..', '..');
const { values: args } = parseArgs({
  options: {
    url: { type: 'string', default: process.env.KINPATH_BENCH_URL ?? 'http://127.0.0.1:3000' },
    connections: { type: 'string', default: '20' },
    duration: { type: 'string', default: '20' },
    warmup: { type: 'string', default: '5' },
    students: { type: 'string', default: '25' },
    'demo-dir': { type: 'string' },
    email: { type: 'string', default: 'advisor@halden.example' },
    password: { type: 'string', default: 'kinpath-demo-2026' },
  },
});
const url = args.url.replace(/\/$/, '');
const connections = Number(args.connections);
const duration = Number(args.duration);

function demoStudentsFile() {
  const candidates = [
    args['demo-dir'],
    process.env.KINPATH_DEMO_DIR,
    join(repoRoot, '.data', 'start', 'demo'),
    join(repoRoot, '.data', 'test', 'demo'),
  ].filter(Boolean);
  for (const dir of candidates) {
    const file = join(dir, 'students.csv');
    if (existsSync(file)) return file;
  }
  throw new Error(`no demo students.csv found in ${candidates.join(', ')}; pass --demo-dir`);
}

async function json(path, init = {}) {
  const res = await fetch(`${url}${path}`, {
    ...init,
    headers: { 'content-type': 'application/json', ...(init.headers ?? {}) },
  });
  const body = await res.json().catch(() => null);
  return { status: res.status, body };
}

function percentile(sorted, p) {
  if (sorted.length === 0) return NaN;
  const rank = Math.ceil((p / 100) * sorted.length) - 1;
  return sorted[Math.min(sorted.length - 1, Math.max(0, rank))];
}

function run(options, onResponse) {
  return new Promise((resolveRun, reject) => {
    const instance = autocannon(options, (error, result) =>
      error ? reject(error) : resolveRun(result),
    );
    if (onResponse) instance.on('response', onResponse);
  });
}

const login = await json('/api/auth/login', {
  method: 'POST',
  body: JSON.stringify({ email: args.email, password: args.password }),
});
if (login.status !== 200) throw new Error(`sign-in answered ${login.status}`);
const auth = { authorization: `Bearer ${login.body.accessToken}` };

// Active students first: the ones an advisor meets before registration.
const rows = readFileSync(demoStudentsFile(), 'utf8').trim().split(/\r?\n/).slice(1);
const ids = rows
  .map((line) => line.split(','))
  .sort((a, b) => Number(b[3] === 'active') - Number(a[3] === 'active'))
  .map((cells) => cells[0])
  .slice(0, Number(args.students));
const refs = [];
for (const studentId of ids) {
  const found = await json('/api/students/lookup', {
    method: 'POST',
    headers: auth,
    body: JSON.stringify({ studentId }),
  });
  if (found.status === 200) refs.push(found.body.ref);
}
if (refs.length === 0) throw new Error('no demo student was found; is the demo loaded?');
const first = await json(`/api/students/${refs[0]}/electives`, { headers: auth });
if (first.status !== 200) throw new Error(`electives answered ${first.status}`);

// A server just started (or just given new term data or settings) rebuilds its model and
// re-scores cohorts in the background; measure once single requests are quick again.
const settleUntil = Date.now() + 60_000;
for (let calm = 0; calm < 5 && Date.now() < settleUntil;) {
  const started = performance.now();
  await json(`/api/students/${refs[calm % refs.length]}/electives`, { headers: auth });
  calm = performance.now() - started < 100 ? calm + 1 : 0;
  if (calm === 0) await new Promise((r) => setTimeout(r, 500));
}

let next = 0;
const base = {
  url,
  connections,
  headers: auth,
  requests: [
    {
      method: 'GET',
      setupRequest: (req) => ({
        ...req,
        path: `/api/students/${refs[next++ % refs.length]}/electives`,
      }),
    },
  ],
};

await run({ ...base, duration: Number(args.warmup) });
const latencies = [];
const result = await run({ ...base, duration }, (_client, _status, _bytes, ms) =>
  latencies.push(ms),
);
latencies.sort((a, b) => a - b);
const figures = {
  route: 'GET /api/students/:ref/electives',
  students: refs.length,
  electivesPerResponse: first.body.electives.length,
  connections,
  durationSeconds: duration,
  requests: result.requests.total,
  non2xx: result.non2xx,
  errors: result.errors,
  requestsPerSecond: Math.round(result.requests.average * 10) / 10,
  p50: percentile(latencies, 50),
  p95: percentile(latencies, 95),
  p99: percentile(latencies, 99),
  max: latencies[latencies.length - 1],
};
console.log(
  `electives: ${figures.connections} concurrent advisors, ${figures.students} students, ${figures.electivesPerResponse} electives each, ${duration} s`,
);
console.log(
  `  p50 ${figures.p50.toFixed(1)} ms   p95 ${figures.p95.toFixed(1)} ms   p99 ${figures.p99.toFixed(1)} ms   max ${figures.max.toFixed(1)} ms`,
);
console.log(
  `  ${figures.requestsPerSecond} requests/s, ${figures.requests} requests, ${figures.non2xx} not 2xx, ${figures.errors} errors`,
);
console.log(`  target p95 <= 150 ms: ${figures.p95 <= 150 ? 'met' : 'NOT met'}`);
console.log(JSON.stringify(figures));
if (figures.non2xx > 0 || figures.errors > 0) process.exitCode = 1;
