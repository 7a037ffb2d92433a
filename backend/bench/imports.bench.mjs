#!/usr/bin/env node
// Import throughput: a records file of 1,000,000 rows (invented, fixed seed)
// validated and committed through the import path, beside a plain COPY of the
// same file into an unindexed table. Prints figures; asserts nothing.
//
//   PGHOST=… PGPORT=… PGUSER=… PGPASSWORD=… node backend/bench/imports.bench.mjs [--rows 1000000]
//
// Uses the built backend (npm run build -w @kinpath/backend). Works in a scratch
// database of its own (created through the PG* connection, dropped at the end).
import { randomBytes } from 'node:crypto';
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
    const { rows } = await client.query(
      `INSERT INTO imports (kind, status, file_name, file_sha256, file_bytes)
       VALUES ('records', 'validating', 'records.csv', repeat('0', 64), $1) RETURNING id`,
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

    t = Date.now();
    await client.query('BEGIN');
    await client.query(TERM_DATA_LOCK);
    const steps = [];
    const counts = await commitRows(client, importId, 'records', accepted, undefined, (s, ms) =>
      steps.push(`${s} ${seconds(ms)} s`),
    );
    console.log(`imports bench: commit steps: ${steps.join(', ')}`);
    await client.query(
      `UPDATE imports SET status = 'committed', committed_at = now() WHERE id = $1`,
      [importId],
    );
    await client.query('COMMIT');
    const commitMs = Date.now() - t;

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
