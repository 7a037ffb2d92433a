#!/usr/bin/env node
// Import throughput: a records file of 1,000,000 rows (invented, fixed seed)
// validated and committed through the import path, beside a plain COPY of the
// same file into an unindexed table. While the commit runs, a server of its own on
// the same database answers GET /api/courses in a loop, and the bench prints how
// long those readers waited (p50, p95, max) beside the same figures at rest.
// Prints figures; asserts nothing.
//
//   PGHOST=… PGPORT=… PGUSER=… PGPASSWORD=… node backend/bench/imports.bench.mjs \
//     [--rows 1000000] [--reader-port N (a free port by default; never 3398 or 3399)]
//
// Uses the built backend (npm run build -w @kinpath/backend). Works in a scratch
// database of its own (created through the PG* connection, dropped at the end).
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { createServer } from 'node:net';
import { createReadStream, createWriteStream, mkdtempSync, rmSync, statSync } from 'node:fs';
import { once } from 'node:events';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
const dist = resolve(import.meta.dirname, '..', 'dist');
const pg = require('pg');
const { from: copyFrom } = require('pg-copy-streams');
require('reflect-metadata');
const { DataSource } = require('typeorm');
const { dataSourceOptions } = require(join(dist, 'database', 'options.js'));
const { validateFile } = require(join(dist, 'imports', 'validation', 'validate-file.js'));
const { commitRows, TERM_DATA_LOCK } = require(join(dist, 'imports', 'term-data-writer.js'));
const { loadGradeScale } = require(join(dist, 'grade-scale', 'grade-scale.model.js'));
const { pseudonymFor } = require(join(dist, 'pseudonym', 'pseudonym.js'));

const args = process.argv.slice(2);
const ROWS = Number(args[args.indexOf('--rows') + 1] || 0) || 1_000_000;
const READER_PORT = args.includes('--reader-port')
  ? Number(args[args.indexOf('--reader-port') + 1])
  : 0;
// Those two belong to the electives benchmarks, which may run beside this one.
if ([3398, 3399].includes(READER_PORT)) throw new Error('--reader-port: 3398 and 3399 are taken');
const SEED = 20260417;

function mulberry32(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const DEPARTMENTS = ['CMP', 'MTH', 'PHY', 'BIO', 'CHM', 'ART', 'MUS', 'HIS', 'ECO', 'LIT'];
const COURSES = DEPARTMENTS.flatMap((d) =>
  Array.from(
    { length: 30 },
    (_, i) => `${d} ${1000 + Math.floor(i / 8) * 1000 + (i % 8) * 10 + 10}`,
  ),
);
const TERMS = [];
for (let year = 2008; year <= 2026; year++)
  for (const s of ['WI', 'SP', 'SU', 'FA']) TERMS.push(`${year}-${s}`);
const GRADES = ['A', 'A-', 'B+', 'B', 'B-', 'C+', 'C', 'C-', 'D+', 'D', 'D-', 'F', 'W', 'P'];

/** Students of 25 records each, every (term, course) of a student distinct. */
async function writeRecords(path, rows) {
  const random = mulberry32(SEED);
  const out = createWriteStream(path);
  out.write('student_id,term,course_code,grade,satisfaction,credits_attempted\n');
  let written = 0;
  let student = 0;
  let buffer = '';
  while (written < rows) {
    const id = `HB${String(3_000_000 + student++).padStart(7, '0')}`;
    const first = Math.floor(random() * (TERMS.length - 12));
    const used = new Set();
    for (let k = 0; k < 25 && written < rows; k++) {
      let course;
      do course = COURSES[Math.floor(random() * COURSES.length)];
      while (used.has(course));
      used.add(course);
      const term = TERMS[first + Math.floor(k / 3)];
      const grade = GRADES[Math.floor(random() * GRADES.length)];
      const satisfaction = random() < 0.2 ? '' : String(1 + Math.floor(random() * 5));
      buffer += `${id},${term},${course},${grade},${satisfaction},3\n`;
      written++;
    }
    if (buffer.length > 1 << 16) {
      if (!out.write(buffer)) await once(out, 'drain');
      buffer = '';
    }
  }
  out.end(buffer);
  await once(out, 'close');
}

const seconds = (ms) => (ms / 1000).toFixed(2);

function freePort() {
  return new Promise((done, fail) => {
    const probe = createServer();
    probe.once('error', fail);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address();
      probe.close(() => ([3398, 3399].includes(port) ? freePort().then(done, fail) : done(port)));
    });
  });
}

/** The built server on the bench's database, demo off, one admin to read the catalogue as. */
async function startReaderServer(dbConfig, work) {
  const port = READER_PORT || (await freePort());
  const password = randomBytes(12).toString('hex');
  const email = 'bench-admin@halden.example';
  const env = {};
  for (const [k, v] of Object.entries(process.env)) if (!k.startsWith('KINPATH_')) env[k] = v;
  const child = spawn(process.execPath, [join(dist, 'main.js')], {
    env: {
      ...env,
      HOST: '127.0.0.1',
      PORT: String(port),
      KINPATH_DB_HOST: dbConfig.host,
      KINPATH_DB_PORT: String(dbConfig.port),
      KINPATH_DB_NAME: dbConfig.name,
      KINPATH_DB_USER: dbConfig.user,
      KINPATH_DB_PASSWORD: dbConfig.password,
      KINPATH_DATA_DIR: join(work, 'server'),
      KINPATH_DEMO: 'off',
      KINPATH_ADMIN_EMAIL: email,
      KINPATH_ADMIN_PASSWORD: password,
      KINPATH_PSEUDONYM_KEY: 'halden-bench-pseudonym-key',
      KINPATH_SCORING_PROCESSES: '0',
      KINPATH_LOG_LEVEL: 'error',
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error('the reader server exited');
    try {
      if ((await fetch(`${url}/api/health`)).ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error('the reader server did not start');
    await new Promise((r) => setTimeout(r, 200));
  }
  const login = await fetch(`${url}/api/auth/login`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  const { accessToken } = await login.json();
  return { url, token: accessToken, stop: () => child.kill('SIGTERM') };
}

/** GET /api/courses one after another until `until` resolves; the time of each. */
async function readWhile(server, until) {
  const times = [];
  let done = false;
  until.finally(() => (done = true));
  do {
    const t = performance.now();
    const res = await fetch(`${server.url}/api/courses`, {
      headers: { Authorization: `Bearer ${server.token}` },
    });
    await res.arrayBuffer();
    if (!res.ok) throw new Error(`GET /api/courses answered ${res.status}`);
    times.push(performance.now() - t);
  } while (!done);
  return times;
}

function latency(times) {
  const sorted = [...times].sort((a, b) => a - b);
  const at = (q) => sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];
  return `p50 ${at(0.5).toFixed(1)} ms, p95 ${at(0.95).toFixed(1)} ms, max ${sorted[sorted.length - 1].toFixed(1)} ms over ${sorted.length} requests`;
}

async function main() {
  const admin = new pg.Client({ database: process.env.PGDATABASE || 'postgres' });
  await admin.connect();
  const database = `kinpath_bench_${randomBytes(4).toString('hex')}`;
  await admin.query(`CREATE DATABASE ${database}`);
  const work = mkdtempSync(join(tmpdir(), 'kinpath-bench-'));
  const dbConfig = {
    host: process.env.PGHOST || '127.0.0.1',
    port: Number(process.env.PGPORT || 5432),
    name: database,
    user: process.env.PGUSER || 'kinpath',
    password: process.env.PGPASSWORD || '',
  };
  const dataSource = new DataSource({ ...dataSourceOptions(dbConfig), logging: false });
  let reader = null;
  try {
    let t = Date.now();
    const file = join(work, 'records.csv');
    await writeRecords(file, ROWS);
    console.log(
      `imports bench: wrote ${ROWS.toLocaleString('en')} records rows (${(statSync(file).size / 1e6).toFixed(1)} MB) in ${seconds(Date.now() - t)} s`,
    );

    await dataSource.initialize();
    await dataSource.runMigrations();
    await dataSource.destroy();

    const client = new pg.Client({ ...dbConfig, database });
    await client.connect();
    await client.query(
      `INSERT INTO courses (course_code, title, department) SELECT c, 'Course ' || c, split_part(c, ' ', 1) FROM unnest($1::text[]) c`,
      [COURSES],
    );
    reader = await startReaderServer({ ...dbConfig, name: database }, work);
    const { rows } = await client.query(
      `INSERT INTO imports (kind, status, file_name, file_digest, digest_keyed, file_bytes)
       VALUES ('records', 'validating', 'records.csv', repeat('0', 64), true, $1) RETURNING id`,
      [statSync(file).size],
    );
    const importId = rows[0].id;
    const key = 'halden-bench-pseudonym-key';
    const scale = await loadGradeScale(async (sql) => (await client.query(sql)).rows);

    t = Date.now();
    const accepted = join(work, 'accepted.csv');
    const result = await validateFile({
      path: file,
      kind: 'records',
      acceptedPath: accepted,
      context: {
        knownCourses: new Set(COURSES),
        scale,
        pseudonymFor: (id) => pseudonymFor(key, id),
      },
    });
    const validateMs = Date.now() - t;
    if (result.rowsRejected > 0)
      throw new Error(`unexpected rejections: ${JSON.stringify(result.rejections[0])}`);

    const atRest = await readWhile(reader, new Promise((r) => setTimeout(r, 3000)));
    t = Date.now();
    const commit = (async () => {
      await client.query('BEGIN');
      await client.query(TERM_DATA_LOCK);
      const steps = [];
      const written = await commitRows(client, importId, 'records', accepted, undefined, (s, ms) =>
        steps.push(`${s} ${seconds(ms)} s`),
      );
      console.log(`imports bench: commit steps: ${steps.join(', ')}`);
      await client.query(
        `UPDATE imports SET status = 'committed', committed_at = now() WHERE id = $1`,
        [importId],
      );
      await client.query('COMMIT');
      return written;
    })();
    const during = await readWhile(reader, commit);
    const counts = await commit;
    const commitMs = Date.now() - t;
    console.log(`imports bench: GET /api/courses at rest: ${latency(atRest)}`);
    console.log(`imports bench: GET /api/courses during the commit: ${latency(during)}`);

    await client.query(`CREATE UNLOGGED TABLE IF NOT EXISTS bench_plain (
      student_id text, term text, course_code text, grade text, satisfaction text, credits_attempted text)`);
    await client.query(`DROP TABLE bench_plain`);
    await client.query(`CREATE TABLE bench_plain (
      student_id text, term text, course_code text, grade text, satisfaction text, credits_attempted text)`);
    t = Date.now();
    await pipeline(
      createReadStream(file),
      client.query(copyFrom(`COPY bench_plain FROM STDIN WITH (FORMAT csv, HEADER true)`)),
    );
    const copyMs = Date.now() - t;
    await client.end();

    const totalMs = validateMs + commitMs;
    console.log(
      `imports bench: validate ${seconds(validateMs)} s, commit ${seconds(commitMs)} s (inserted ${counts.inserted.toLocaleString('en')}, students created ${counts.studentsCreated.toLocaleString('en')})`,
    );
    console.log(
      `imports bench: ${ROWS.toLocaleString('en')} records rows validated and committed in ${seconds(totalMs)} s (${Math.round(ROWS / (totalMs / 1000)).toLocaleString('en')} rows/s; target 60 s)`,
    );
    console.log(
      `imports bench: plain COPY of the same rows into an unindexed table: ${seconds(copyMs)} s`,
    );
    console.log(`imports bench: ratio import / plain COPY = ${(totalMs / copyMs).toFixed(1)}`);
  } finally {
    reader?.stop();
    if (dataSource.isInitialized) await dataSource.destroy();
    await admin.query(`DROP DATABASE IF EXISTS ${database} WITH (FORCE)`);
    await admin.end();
    rmSync(work, { recursive: true, force: true });
  }
}

main().catch((error) => {
  console.error(`imports bench: ${error.stack ?? error.message}`);
  process.exit(1);
});
