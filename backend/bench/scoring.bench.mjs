#!/usr/bin/env node
// Cohort scoring through the job machinery: the engine benchmark's invented university
// (generateUniversity, fixed seed) loaded straight into a scratch database with COPY, every
// active student scored over every offered elective of the next term as chunks on pg-boss by
// scoring worker processes, results stored. Prints the time, the per-chunk rate and where the
// time went (seconds per phase, summed over chunks, from the chunk and run tables); asserts
// nothing. Target: 40,000 active students in <= 90 s with both cores.
//
//   PGHOST=… PGPORT=… PGUSER=… PGPASSWORD=… node backend/bench/scoring.bench.mjs
//       [--students 200000] [--active 40000] [--offered all|N] [--chunk 2000] [--processes 2]
//
// Uses the built backend and engine (npm run build). The scratch database is dropped at the end.
import { spawn } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { createRequire } from 'node:module';
import { join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { loadUniversity, migrate } from './university.mjs';

const require = createRequire(import.meta.url);
const dist = resolve(import.meta.dirname, '..', 'dist');
const pg = require('pg');
const engine = require('@kinpath/engine');
const { DATA_STAMP_SQL } = require(join(dist, 'forecasts', 'cohort.js'));
const { ScoringQueue } = require(join(dist, 'forecasts', 'scoring-queue.js'));

const { values: args } = parseArgs({
  options: {
    students: { type: 'string', default: '200000' },
    active: { type: 'string', default: '40000' },
    offered: { type: 'string', default: 'all' },
    chunk: { type: 'string', default: '2000' },
    processes: { type: 'string', default: '2' },
  },
});
const S = Number(args.students);
const ACTIVE = Math.min(Number(args.active), S);
const CHUNK = Number(args.chunk);
const PROCESSES = Number(args.processes);
const seconds = (t0) => ((performance.now() - t0) / 1000).toFixed(1);
const out = (label, value) => console.log(`${label.padEnd(44)} ${value}`);

async function main() {
  out('machine', `${require('node:os').availableParallelism()} cores, Node ${process.version}`);
  let t0 = performance.now();
  const uni = engine.generateUniversity({ students: S });
  out(
    'generate (engine benchmark data)',
    `${S} students, ${uni.students.length} records, ${seconds(t0)} s`,
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
    await migrate(dbConfig);

    t0 = performance.now();
    const client = new pg.Client({ database });
    await client.connect();
    const { term, offered } = await loadUniversity(client, uni, {
      active: ACTIVE,
      offered: args.offered,
      pseudonym,
    });
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
      `${total.toFixed(1)} s for ${students} active students x ${offered.length} offered electives, ${PROCESSES} processes`,
    );
    out('  rows stored (eligible pairs)', `${Number(c.rows)}`);
    out(
      '  per chunk (engine scoring only, mean)',
      `${(Number(c.ms) / 1000).toFixed(1)} s for ${CHUNK} students: ${((CHUNK * offered.length) / (Number(c.ms) / 1000)).toFixed(0)} predictions/s per process`,
    );
    out('  throughput', `${(students / total).toFixed(1)} students/s overall`);
    out(
      '  at this rate, 40,000 active students',
      `${((40_000 / students) * total).toFixed(0)} s (target <= 90 s)`,
    );
    await printPhases(client, run.id);
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
    await dropDatabase(admin, database);
    await admin.end();
  }
}

/** Seconds per phase: the chunks' summed over chunks, then the planning and finalising jobs'. */
async function printPhases(client, runId) {
  const { rows: chunks } = await client.query(
    `SELECT key, sum(value::float8) AS ms, count(*) AS n
     FROM scoring_chunks, jsonb_each_text(phase_ms) WHERE run_id = $1
     GROUP BY key ORDER BY sum(value::float8) DESC`,
    [runId],
  );
  console.log('  seconds per phase, summed over chunks (both processes):');
  for (const r of chunks) out(`    ${r.key}`, `${(r.ms / 1000).toFixed(2)} s  (${r.n} chunks)`);
  const {
    rows: [run],
  } = await client.query(`SELECT phase_ms FROM scoring_runs WHERE id = $1`, [runId]);
  console.log('  seconds per phase of the planning and finalising jobs:');
  for (const [key, ms] of Object.entries(run.phase_ms ?? {}))
    out(`    ${key}`, `${(ms / 1000).toFixed(2)} s`);
}

/** Autovacuum may still be at work on the fresh tables; it is not ours to end, so wait. */
async function dropDatabase(admin, database) {
  for (let attempt = 1; ; attempt++) {
    try {
      return await admin.query(`DROP DATABASE IF EXISTS ${database} WITH (FORCE)`);
    } catch (error) {
      if (attempt >= 30) throw error;
      await new Promise((res) => setTimeout(res, 2000));
    }
  }
}

main().catch((error) => {
  console.error(`scoring benchmark: ${error.stack ?? error.message}`);
  process.exit(1);
});
