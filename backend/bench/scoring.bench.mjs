#!/usr/bin/env node
// Cohort scoring through the job machinery: the engine benchmark's invented university
// (generateUniversity, fixed seed) loaded straight into a scratch database with COPY, every
// active student scored over every offered elective of the next term as chunks on pg-boss by
// scoring worker processes, results stored. Prints the time and the per-chunk rate; asserts
// nothing. Target: 40,000 active students in <= 90 s with both cores.
//
//   PGHOST=… PGPORT=… PGUSER=… PGPASSWORD=… node backend/bench/scoring.bench.mjs
//       [--students 200000] [--active 40000] [--offered all|N] [--chunk 2000]
//       [--processes 2] [--threads 1]
//
// Uses the built backend and engine (npm run build). The scratch database is dropped at the end.
import { spawn } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { createRequire } from 'node:module';
import { join, resolve } from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { parseArgs } from 'node:util';

const require = createRequire(import.meta.url);
const dist = resolve(import.meta.dirname, '..', 'dist');
const pg = require('pg');
const { from: copyFrom } = require('pg-copy-streams');
require('reflect-metadata');
const { DataSource } = require('typeorm');
const engine = require('@kinpath/engine');
const { dataSourceOptions } = require(join(dist, 'database', 'options.js'));
const { DATA_STAMP_SQL } = require(join(dist, 'forecasts', 'cohort.js'));
const { ScoringQueue } = require(join(dist, 'forecasts', 'scoring-queue.js'));

const { values: args } = parseArgs({
  options: {
    students: { type: 'string', default: '200000' },
    active: { type: 'string', default: '40000' },
    offered: { type: 'string', default: 'all' },
    chunk: { type: 'string', default: '2000' },
    processes: { type: 'string', default: '2' },
    threads: { type: 'string', default: '1' },
  },
});
const S = Number(args.students);
const ACTIVE = Math.min(Number(args.active), S);
const CHUNK = Number(args.chunk);
const PROCESSES = Number(args.processes);
const seconds = (t0) => ((performance.now() - t0) / 1000).toFixed(1);
const out = (label, value) => console.log(`${label.padEnd(44)} ${value}`);

const LETTERS = [
  ['F', 0], ['D-', 0.7], ['D', 1], ['D+', 1.3], ['C-', 1.7], ['C', 2], ['C+', 2.3], ['B-', 2.7],
  ['B', 3], ['B+', 3.3], ['A-', 3.7], ['A', 4],
]; // prettier-ignore
const letterOf = new Map(LETTERS.map(([l, p]) => [p, l]));

/** Course keys as the catalogue accepts them (the generator may add an X to a repeated key). */
function courseCodes(keys) {
  const valid = /^[A-Z]{2,6} [0-9]{3,5}$/;
  let extra = 0;
  return new Map(keys.map((k) => [k, valid.test(k) ? k : `XTR ${10000 + extra++}`]));
}

async function copyRows(client, sql, rows) {
  await pipeline(Readable.from(rows), client.query(copyFrom(sql)));
}

function* lines(count, line, batch = 8192) {
  let buffer = '';
  for (let i = 0; i < count; i++) {
    const l = line(i);
    if (l) buffer += l;
    if ((i + 1) % batch === 0) {
      yield buffer;
      buffer = '';
    }
  }
  if (buffer) yield buffer;
}

async function main() {
  out('machine', `${require('node:os').availableParallelism()} cores, Node ${process.version}`);
  let t0 = performance.now();
  const uni = engine.generateUniversity({ students: S });
  out(
    'generate (engine benchmark data)',
    `${S} students, ${uni.students.length} records, ${seconds(t0)} s`,
  );
  const codes = courseCodes(uni.courseKeys);
  const electives = uni.electives.map((k) => codes.get(k));
  const offered = args.offered === 'all' ? electives : electives.slice(0, Number(args.offered));
  const lastTerm = uni.termKeys[uni.termKeys.length - 1];
  const term = `${Number(lastTerm.slice(0, 4)) + 1}-SP`;
  const active = new Set(
    Array.from({ length: ACTIVE }, (_, i) => uni.studentKeys[(i * 5) % uni.studentKeys.length]),
  );
  const pseudonym = (k) => createHash('sha256').update(`bench:${k}`).digest('hex');

  const database = `kinpath_outlook_bench_${randomBytes(4).toString('hex')}`;
  const admin = new pg.Client({ database: process.env.PGDATABASE ?? 'postgres' });
  await admin.connect();
  await admin.query(`CREATE DATABASE ${database}`);
  const dbConfig = {
    host: process.env.PGHOST ?? '127.0.0.1',
    port: Number(process.env.PGPORT ?? 5432),
    name: database,
    user: process.env.PGUSER ?? 'kinpath',
    password: process.env.PGPASSWORD ?? '',
  };
  const workers = [];
  let queue = null;
  try {
    const dataSource = new DataSource({ ...dataSourceOptions(dbConfig), logging: false });
    await dataSource.initialize();
    await dataSource.runMigrations();
    await dataSource.destroy();

    t0 = performance.now();
    const client = new pg.Client({ database });
    await client.connect();
    const electiveSet = new Set(uni.electives);
    await copyRows(
      client,
      `COPY courses (course_code, title, department, credits, elective) FROM STDIN`,
      lines(uni.courseKeys.length, (i) => {
        const code = codes.get(uni.courseKeys[i]);
        return `${code}\tCourse ${code}\t${code.split(' ')[0]}\t3\t${electiveSet.has(uni.courseKeys[i])}\n`;
      }),
    );
    await copyRows(
      client,
      `COPY offerings (term, course_code, sections, capacity) FROM STDIN`,
      lines(offered.length, (i) => `${term}\t${offered[i]}\t2\t100\n`),
    );
    // Entry term: each student's first term with a record.
    const first = new Map();
    for (let r = 0; r < uni.students.length; r++) {
      const s = uni.students[r];
      const t = uni.terms[r];
      const seen = first.get(s);
      if (!seen || engine.registrarTermOrder(t, seen) < 0) first.set(s, t);
    }
    await copyRows(
      client,
      `COPY students (pseudonym, program, entry_term, status) FROM STDIN`,
      lines(uni.studentKeys.length, (i) => {
        const k = uni.studentKeys[i];
        return `${pseudonym(k)}\tP${uni.programmeOf[i]}\t${first.get(k) ?? lastTerm}\t${active.has(k) ? 'active' : 'graduated'}\n`;
      }),
    );
    // One record per student, term and course (the table's key); the generator may repeat one.
    const seen = new Set();
    const pseudonyms = new Map();
    await copyRows(
      client,
      `COPY records (student_pseudonym, term, course_code, grade, grade_points, satisfaction) FROM STDIN`,
      lines(uni.students.length, (r) => {
        const key = `${uni.students[r]}|${uni.terms[r]}|${uni.courses[r]}`;
        if (seen.has(key)) return '';
        seen.add(key);
        if (seen.size > 2_000_000) seen.clear(); // Records come grouped by student.
        let p = pseudonyms.get(uni.students[r]);
        if (!p) pseudonyms.set(uni.students[r], (p = pseudonym(uni.students[r])));
        const g = uni.grades[r];
        const grade = g === g ? (letterOf.get(g) ?? 'C') : 'W';
        const points = g === g ? String(g) : '\\N';
        const sat = uni.satisfaction[r];
        return `${p}\t${uni.terms[r]}\t${codes.get(uni.courses[r])}\t${grade}\t${points}\t${sat === sat ? sat : '\\N'}\n`;
      }),
    );
    await client.query('ANALYZE');
    out(
      'COPY into a scratch database',
      `${seconds(t0)} s (${offered.length} electives offered in ${term})`,
    );

    const [{ stamp }] = (await client.query(DATA_STAMP_SQL)).rows;
    const {
      rows: [run],
    } = await client.query(
      `INSERT INTO scoring_runs (term, settings_version, data_stamp, reason, parts, chunk_size, beta)
       VALUES ($1, 1, $2, 'bench', ARRAY['forecast'], $3, 0.05) RETURNING id`,
      [term, stamp, CHUNK],
    );

    queue = new ScoringQueue(dbConfig, (e) => console.error(`queue: ${e.message}`));
    await queue.start();
    const env = {
      PATH: process.env.PATH ?? '',
      KINPATH_DB_HOST: dbConfig.host,
      KINPATH_DB_PORT: String(dbConfig.port),
      KINPATH_DB_USER: dbConfig.user,
      KINPATH_DB_PASSWORD: dbConfig.password,
      KINPATH_DB_NAME: database,
      KINPATH_SCORING_THREADS: args.threads,
      KINPATH_LOG_FORMAT: 'text',
    };
    t0 = performance.now();
    for (let i = 0; i < PROCESSES; i++) {
      const child = spawn(process.execPath, [join(dist, 'forecasts', 'scoring-worker.js')], {
        env,
        stdio: ['ignore', 'pipe', 'inherit'],
      });
      child.stdout.on('data', (b) => {
        for (const l of b.toString().split('\n'))
          if (/Cohort read|done/.test(l)) console.log(`  ${l}`);
      });
      workers.push(child);
    }
    await queue.send([{ kind: 'plan', runId: run.id }]);
    let last = '';
    for (;;) {
      const {
        rows: [r],
      } = await client.query(
        `SELECT status, chunks_done, chunks_total, error FROM scoring_runs WHERE id = $1`,
        [run.id],
      );
      const line = `${r.chunks_done}/${r.chunks_total} chunks`;
      if (line !== last) {
        console.log(`  ${seconds(t0).padStart(6)} s  ${line}`);
        last = line;
      }
      if (r.status === 'done') break;
      if (r.status !== 'queued' && r.status !== 'scoring')
        throw new Error(`run ${r.status}: ${r.error}`);
      await new Promise((res) => setTimeout(res, 1000));
    }
    const total = (performance.now() - t0) / 1000;
    const {
      rows: [c],
    } = await client.query(
      `SELECT count(*) AS chunks, sum(rows) AS rows, avg(scoring_ms) AS ms, sum(count) AS students
       FROM scoring_chunks WHERE run_id = $1`,
      [run.id],
    );
    const students = Number(c.students);
    out(
      'scored by the job (plan to done)',
      `${total.toFixed(1)} s for ${students} active students x ${offered.length} offered electives, ${PROCESSES} processes x ${args.threads} thread`,
    );
    out('  rows stored (eligible pairs)', `${Number(c.rows)}`);
    out(
      '  per chunk (scoring only, mean)',
      `${(Number(c.ms) / 1000).toFixed(1)} s for ${CHUNK} students: ${((CHUNK * offered.length) / (Number(c.ms) / 1000)).toFixed(0)} predictions/s per process`,
    );
    out('  throughput', `${(students / total).toFixed(1)} students/s overall`);
    out(
      '  at this rate, 40,000 active students',
      `${((40_000 / students) * total).toFixed(0)} s (target <= 90 s)`,
    );
    await client.end();
  } finally {
    await Promise.all(
      workers.map(
        (w) =>
          new Promise((res) => {
            if (w.exitCode !== null || w.signalCode !== null) return res();
            w.once('exit', res);
            w.kill('SIGTERM');
          }),
      ),
    );
    await queue?.stop();
    await admin.query(`DROP DATABASE IF EXISTS ${database} WITH (FORCE)`);
    await admin.end();
  }
}

main().catch((error) => {
  console.error(`scoring benchmark: ${error.stack ?? error.message}`);
  process.exit(1);
});
