#!/usr/bin/env node
// Electives latency at full size: the engine benchmark's university (200,000 students,
// ~8 M records) loaded into a database of its own, a real server started on it (its model
// built from those records), an advisor who looks students up by number, then
// GET /api/students/:ref/electives (next term, every offered elective) driven with autocannon,
// one connection and many, each request for another student. Prints the server's time to
// ready, its RSS, p50/p95/p99 and requests/s with the load average beside each run; asserts
// nothing. Target: p95 <= 300 ms with 20 concurrent advisors.
//
//   PGHOST=… PGPORT=… PGUSER=… PGPASSWORD=… node backend/bench/electives-full.bench.mjs
//       [--students 200000] [--active 40000] [--database kinpath_bench_200k] [--port 3398]
//       [--connections 20] [--single 100] [--cold 600] [--duration 20] [--keep]
//
// Cold: students the server has not read since its model was built (it keeps the records of
// the students advisors look at, per model; the estimates are computed on every request).
// Warm: the students of the cold runs again. --keep keeps the database for the next run,
// which then reuses it. Uses the built backend and engine (npm run build).
import autocannon from 'autocannon';
import { createRequire } from 'node:module';
import { availableParallelism, loadavg } from 'node:os';
import { mkdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { startServer, stopProcess } from '../../tools/lib/setup.mjs';
import { activeStudents, loadUniversity, migrate } from './university.mjs';

const require = createRequire(import.meta.url);
const repoRoot = resolve(import.meta.dirname, '..', '..');
const dist = resolve(import.meta.dirname, '..', 'dist');
const pg = require('pg');
const engine = require('@kinpath/engine');
const { pseudonymFor } = require(join(dist, 'pseudonym', 'pseudonym.js'));
const { readOrCreateSecret } = require(join(dist, 'config', 'secrets.js'));

const { values: args } = parseArgs({
  options: {
    students: { type: 'string', default: '200000' },
    active: { type: 'string', default: '40000' },
    database: { type: 'string', default: 'kinpath_bench_200k' },
    port: { type: 'string', default: '3398' },
    connections: { type: 'string', default: '20' },
    single: { type: 'string', default: '100' },
    cold: { type: 'string', default: '600' },
    duration: { type: 'string', default: '20' },
    keep: { type: 'boolean', default: false },
  },
});
const S = Number(args.students);
const CONNECTIONS = Number(args.connections);
const SINGLE = Number(args.single);
const COLD = Number(args.cold);
const DURATION = Number(args.duration);
const database = args.database;
if (!/^[a-z_][a-z0-9_]*$/.test(database)) throw new Error(`not a database name: ${database}`);
const url = `http://127.0.0.1:${args.port}`;
const seconds = (t0) => ((performance.now() - t0) / 1000).toFixed(1);
const out = (label, value) => console.log(`${label.padEnd(44)} ${value}`);

/** The 1, 5 and 15 minute load averages, as `uptime` prints them. */
function load() {
  const [one, five, fifteen] = loadavg().map((l) => l.toFixed(2));
  return `load average ${one} ${five} ${fifteen}`;
}

// The pseudonym key and the account password live in the benchmark's own data folder,
// so a kept database still matches them on the next run.
const dataDir = join(repoRoot, '.data', 'bench-full');
const serverDir = join(dataDir, 'server');
mkdirSync(serverDir, { recursive: true, mode: 0o700 });
const pseudonymKey = readOrCreateSecret(dataDir, 'pseudonym-key');
const password = readOrCreateSecret(dataDir, 'account-password');
const ADMIN = 'admin@halden.example';
const ADVISOR = 'advisor@halden.example';

/** Resident and peak resident memory of a process, in MB (Linux). */
function memory(pid) {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const mb = (field) =>
    Math.round(Number(new RegExp(`${field}:\\s+(\\d+)`).exec(status)[1]) / 1024);
  return `RSS ${mb('VmRSS')} MB, peak ${mb('VmHWM')} MB`;
}

async function api(method, path, token, body) {
  const res = await fetch(`${url}${path}`, {
    method,
    headers: {
      'content-type': 'application/json',
      ...(token ? { authorization: `Bearer ${token}` } : {}),
    },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  return { status: res.status, body: text ? JSON.parse(text) : null, bytes: text.length };
}

async function signIn(email) {
  const res = await api('POST', '/api/auth/login', undefined, { email, password });
  if (res.status !== 200) throw new Error(`sign-in as ${email} answered ${res.status}`);
  return res.body.accessToken;
}

/** Fills the database unless --keep kept one holding this university; answers whether it did. */
async function prepareDatabase(admin, uni, pgConfig) {
  const existing = await admin.query(`SELECT 1 FROM pg_database WHERE datname = $1`, [database]);
  if (args.keep && existing.rowCount > 0) {
    const client = new pg.Client({ ...pgConfig, database });
    await client.connect();
    const { rows } = await client
      .query(`SELECT count(*)::int AS n FROM students`)
      .catch(() => ({ rows: [{ n: 0 }] }));
    await client.end();
    if (rows[0].n === S) return false;
  }
  await admin.query(`DROP DATABASE IF EXISTS ${database} WITH (FORCE)`);
  await admin.query(`CREATE DATABASE ${database}`);
  await migrate({ ...serverDb(pgConfig), name: database });
  const client = new pg.Client({ ...pgConfig, database });
  await client.connect();
  try {
    await loadUniversity(client, uni, {
      active: Number(args.active),
      pseudonym: (k) => pseudonymFor(pseudonymKey, k),
    });
  } finally {
    await client.end();
  }
  return true;
}

function serverDb(pgConfig) {
  return {
    host: pgConfig.host,
    port: pgConfig.port,
    name: database,
    user: pgConfig.user,
    password: pgConfig.password,
  };
}

/** Starts the server on the database; resolves once its model is built. */
async function startOnDatabase(db) {
  const t0 = performance.now();
  const child = await startServer(
    {
      HOST: '127.0.0.1',
      PORT: args.port,
      KINPATH_DB_HOST: db.host,
      KINPATH_DB_PORT: String(db.port),
      KINPATH_DB_NAME: db.name,
      KINPATH_DB_USER: db.user,
      KINPATH_DB_PASSWORD: db.password,
      KINPATH_DATA_DIR: serverDir,
      KINPATH_PSEUDONYM_KEY: pseudonymKey,
      KINPATH_DEMO: 'off',
      KINPATH_ADMIN_EMAIL: ADMIN,
      KINPATH_ADMIN_PASSWORD: password,
      // The outlook run of 40,000 students would hold a core meanwhile; the route measured
      // here does not use it.
      KINPATH_OUTLOOK_PROCESSES: '0',
      KINPATH_LOG_LEVEL: 'log',
      KINPATH_LOG_FORMAT: 'json',
      KINPATH_STATIC_DIR: join(repoRoot, 'frontend', 'dist'),
    },
    { stdio: ['ignore', 'pipe', 'pipe'] },
  );
  const listening = seconds(t0);
  // The server answers health checks while it builds its model; its log says when that is done.
  const built = new Promise((resolveBuilt, reject) => {
    const onEntry = (entry) => {
      if (/^Model built in/.test(entry.message)) resolveBuilt(entry.message);
      if (entry.level !== 'warn' && entry.level !== 'error') return;
      console.error(`  server: ${entry.message}`);
      if (entry.level === 'error' && entry.context === 'ModelService')
        reject(new Error('the server could not build its model'));
    };
    for (const stream of [child.stdout, child.stderr]) {
      let rest = '';
      stream.on('data', (chunk) => {
        const lines = (rest + chunk).split('\n');
        rest = lines.pop();
        for (const line of lines) {
          try {
            onEntry(JSON.parse(line));
          } catch {
            if (line.trim()) console.error(`  server: ${line}`);
          }
        }
      });
    }
    child.once('exit', (code) => reject(new Error(`the server exited with code ${code}`)));
  });
  try {
    const message = await built;
    return { child, listening, ready: seconds(t0), message };
  } catch (error) {
    await stopProcess(child);
    throw error;
  }
}

function percentile(sorted, p) {
  if (sorted.length === 0) return NaN;
  const rank = Math.ceil((p / 100) * sorted.length) - 1;
  return sorted[Math.min(sorted.length - 1, Math.max(0, rank))];
}

/** One autocannon run over `refs` in order (amount: exactly those; duration: round and round). */
async function measure(label, token, refs, { connections, amount, duration }) {
  const before = load();
  let next = 0;
  const latencies = [];
  const instance = autocannon({
    url,
    connections,
    ...(amount ? { amount } : { duration }),
    timeout: 60,
    headers: { authorization: `Bearer ${token}` },
    requests: [
      {
        method: 'GET',
        setupRequest: (req) => ({
          ...req,
          path: `/api/students/${refs[next++ % refs.length]}/electives`,
        }),
      },
    ],
  });
  instance.on('response', (_client, _status, _bytes, ms) => latencies.push(ms));
  const result = await new Promise((resolveRun, reject) =>
    instance.once('done', resolveRun).once('error', reject),
  );
  latencies.sort((a, b) => a - b);
  const f = (ms) => `${ms.toFixed(0)} ms`;
  console.log(`${label}`);
  console.log(
    `  p50 ${f(percentile(latencies, 50))}   p95 ${f(percentile(latencies, 95))}   p99 ${f(percentile(latencies, 99))}   max ${f(latencies.at(-1) ?? NaN)}`,
  );
  console.log(
    `  ${(result.requests.total / result.duration).toFixed(1)} requests/s, ${result.requests.total} requests in ${result.duration.toFixed(1)} s, ${Math.min(next, refs.length)} students, ${result.non2xx} not 2xx, ${result.errors + result.timeouts} errors`,
  );
  console.log(`  before: ${before}; after: ${load()}`);
  return percentile(latencies, 95);
}

/** Looks the students up as the advisor would, a few at a time; answers their refs. */
async function lookUp(token, numbers) {
  const refs = new Array(numbers.length);
  let i = 0;
  const worker = async () => {
    while (i < numbers.length) {
      const n = i++;
      const res = await api('POST', '/api/students/lookup', token, { studentId: numbers[n] });
      if (res.status !== 200) throw new Error(`lookup answered ${res.status}`);
      refs[n] = res.body.ref;
    }
  };
  await Promise.all(Array.from({ length: 8 }, worker));
  return refs;
}

async function main() {
  out('machine', `${availableParallelism()} cores, Node ${process.version}, ${load()}`);
  let t0 = performance.now();
  const uni = engine.generateUniversity({ students: S });
  out(
    'generate (engine benchmark data)',
    `${S} students, ${uni.students.length} records, ${seconds(t0)} s`,
  );
  const pgConfig = {
    host: process.env.PGHOST ?? '127.0.0.1',
    port: Number(process.env.PGPORT ?? 5432),
    user: process.env.PGUSER ?? 'kinpath',
    password: process.env.PGPASSWORD ?? '',
  };
  const admin = new pg.Client({ ...pgConfig, database: process.env.PGDATABASE ?? 'postgres' });
  await admin.connect();
  let server = null;
  try {
    t0 = performance.now();
    const loaded = await prepareDatabase(admin, uni, pgConfig);
    out(
      `database ${database}`,
      loaded ? `loaded with COPY in ${seconds(t0)} s` : 'kept from the last run (--keep)',
    );

    server = await startOnDatabase(serverDb(pgConfig));
    out('server listening (health answers)', `${server.listening} s after start`);
    out('server ready (model built)', `${server.ready} s after start; ${server.message}`);
    out('  server memory when ready', `${memory(server.child.pid)}; ${load()}`);

    const adminToken = await signIn(ADMIN);
    const created = await api('POST', '/api/users', adminToken, {
      email: ADVISOR,
      displayName: 'Benchmark advisor',
      role: 'advisor',
      password,
    });
    if (created.status !== 201 && created.status !== 409)
      throw new Error(`creating the advisor answered ${created.status}`);
    const token = await signIn(ADVISOR);

    // Distinct active students: a few to warm up on, then one list per cold run.
    const warmUp = 5;
    const numbers = activeStudents(uni, Number(args.active)).slice(0, warmUp + SINGLE + COLD);
    if (numbers.length < warmUp + SINGLE + COLD) throw new Error('too few active students');
    t0 = performance.now();
    const refs = await lookUp(token, numbers);
    out('advisor lookups by student number', `${refs.length} students, ${seconds(t0)} s`);
    const first = await api('GET', `/api/students/${refs[0]}/electives`, token);
    if (first.status !== 200) throw new Error(`electives answered ${first.status}`);
    out(
      'one answer',
      `${first.body.electives.length} electives for ${first.body.term}, ${(first.bytes / 1024).toFixed(0)} KB of JSON`,
    );
    for (const ref of refs.slice(1, warmUp))
      await api('GET', `/api/students/${ref}/electives`, token);

    const single = refs.slice(warmUp, warmUp + SINGLE);
    const cold = refs.slice(warmUp + SINGLE);
    console.log('');
    await measure(`cold, 1 connection (${SINGLE} students, each once)`, token, single, {
      connections: 1,
      amount: SINGLE,
    });
    const p95 = await measure(
      `cold, ${CONNECTIONS} connections (${COLD} students, each once)`,
      token,
      cold,
      { connections: CONNECTIONS, amount: COLD },
    );
    const warm = [...single, ...cold];
    await measure(`warm, 1 connection (${warm.length} students, ${DURATION} s)`, token, warm, {
      connections: 1,
      duration: DURATION,
    });
    const warmP95 = await measure(
      `warm, ${CONNECTIONS} connections (${warm.length} students, ${DURATION} s)`,
      token,
      warm,
      { connections: CONNECTIONS, duration: DURATION },
    );
    // Requests still in flight when a timed run ends finish before this one answers.
    await api('GET', `/api/students/${warm[0]}/electives`, token);
    console.log('');
    out('  server memory after the runs', memory(server.child.pid));
    out(
      `target p95 <= 300 ms at ${CONNECTIONS} connections`,
      `cold ${p95 <= 300 ? 'met' : 'NOT met'}, warm ${warmP95 <= 300 ? 'met' : 'NOT met'}`,
    );
  } finally {
    await stopProcess(server?.child);
    if (!args.keep) await admin.query(`DROP DATABASE IF EXISTS ${database} WITH (FORCE)`);
    await admin.end();
  }
}

main().catch((error) => {
  console.error(`electives benchmark (full size): ${error.stack ?? error.message}`);
  process.exit(1);
});
