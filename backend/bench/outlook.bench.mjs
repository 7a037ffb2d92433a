#!/usr/bin/env node
// The whole demand outlook at scale: the engine benchmark's invented university
// (generateUniversity, fixed seed) loaded straight into a scratch database with COPY, with
// every elective offered in each term it has records in and all electives in the next term;
// then one outlook run computed by the worker's own code in this process: the term data read,
// the live forecast over the active students and its backtests (three reported, three more
// that calibrate their intervals), the rows stored. Prints seconds per phase (from the run's
// summary) and the process's peak memory; asserts nothing. Target: <= 180 s and <= 1.5 GB at
// 200,000 students, 40,000 active, 3,000 electives.
//
//   PGHOST=… PGPORT=… PGUSER=… PGPASSWORD=… node --expose-gc backend/bench/outlook.bench.mjs
//       [--students 200000] [--active 40000]
//
// Uses the built backend and engine (npm run build). The scratch database is dropped at the end.
import { spawnSync } from 'node:child_process';
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
const { OutlookRunner } = require(join(dist, 'forecasts', 'outlook-runner.js'));

const { values: args } = parseArgs({
  options: {
    students: { type: 'string', default: '200000' },
    active: { type: 'string', default: '40000' },
    // Internal: compute one run in a process of its own, so its peak memory is the run's.
    run: { type: 'string' },
    database: { type: 'string' },
  },
});

async function computeRun(database, runId) {
  const pool = new pg.Pool({ database, max: 3 });
  const t0 = performance.now();
  const runner = new OutlookRunner(pool, { worker: 'bench', log: (m) => console.log(`  ${m}`) });
  await runner.handle({ runId });
  console.log(
    JSON.stringify({ ms: performance.now() - t0, maxRss: process.resourceUsage().maxRSS * 1024 }),
  );
  await pool.end();
}
const S = Number(args.students);
const ACTIVE = Math.min(Number(args.active), S);
const seconds = (t0) => ((performance.now() - t0) / 1000).toFixed(1);
const out = (label, value) => console.log(`${label.padEnd(44)} ${value}`);
const mb = (bytes) => `${(bytes / 1024 / 1024).toFixed(0)} MB`;

async function main() {
  out('machine', `${require('node:os').availableParallelism()} cores, Node ${process.version}`);
  out(
    'load average',
    require('node:os')
      .loadavg()
      .map((x) => x.toFixed(1))
      .join(' '),
  );
  let t0 = performance.now();
  let uni = engine.generateUniversity({ students: S });
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
  const pool = new pg.Pool({ database, max: 3 });
  try {
    await migrate(dbConfig);
    t0 = performance.now();
    const client = new pg.Client({ database });
    await client.connect();
    const { term, offered } = await loadUniversity(client, uni, {
      active: ACTIVE,
      pseudonym,
      pastOfferings: true,
    });
    const [{ n }] = (await client.query(`SELECT count(*) AS n FROM offerings`)).rows;
    out(
      'COPY into a scratch database',
      `${seconds(t0)} s (${offered.length} electives offered in ${term}, ${n} offerings in all)`,
    );
    const [{ stamp }] = (await client.query(DATA_STAMP_SQL)).rows;
    const {
      rows: [run],
    } = await client.query(
      `INSERT INTO outlook_runs (term, data_stamp, reason) VALUES ($1, $2, 'bench') RETURNING id`,
      [term, stamp],
    );
    await client.end();
    uni = null;
    const child = spawnSync(
      process.execPath,
      [import.meta.filename, '--database', database, '--run', run.id],
      { env: process.env, encoding: 'utf8', maxBuffer: 1 << 24 },
    );
    if (child.status !== 0) throw new Error(`the run's process failed: ${child.stderr}`);
    const lines = child.stdout.trim().split('\n');
    for (const l of lines.slice(0, -1)) console.log(l);
    const measured = JSON.parse(lines[lines.length - 1]);
    const total = (measured.ms / 1000).toFixed(1);
    const {
      rows: [done],
    } = await pool.query(`SELECT status, error, summary FROM outlook_runs WHERE id = $1`, [run.id]);
    if (done.status !== 'done') throw new Error(`the run ended ${done.status}: ${done.error}`);
    out('outlook run (read, compute, store)', `${total} s`);
    for (const [phase, ms] of Object.entries(done.summary.phaseMs)) {
      out(`  ${phase}`, `${(ms / 1000).toFixed(1)} s`);
    }
    out('peak RSS of the run (a process of its own)', mb(measured.maxRss));
    const pct = (x) => (x === null ? '–' : `${(100 * x).toFixed(1)} %`);
    for (const t of done.summary.terms) {
      out(
        `backtest ${t.term}`,
        `model ${pct(t.modelWape)}, naive ${pct(t.naiveWape)}, same term ${pct(t.sameTermWape)}, take-up ${pct(t.takeUpWape)}, coverage ${pct(t.coverage)}`,
      );
    }
  } finally {
    await pool.end();
    await admin.query(`DROP DATABASE IF EXISTS ${database}`);
    await admin.end();
  }
}

(args.run ? computeRun(args.database, args.run) : main()).catch((error) => {
  console.error(`outlook benchmark: ${error.stack ?? error.message}`);
  process.exit(1);
});
