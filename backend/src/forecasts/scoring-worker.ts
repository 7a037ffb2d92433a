/**
 * A scoring worker process: consumes the demand outlook's scoring jobs and nothing else.
 *
 *   node backend/dist/forecasts/scoring-worker.js     (the server's KINPATH_DB_* settings)
 *
 * Start more of them, here or on other machines sharing the database, to finish a run sooner:
 * each scores in its own thread, so one process per core.
 */
import { hostname } from 'node:os';
import { Pool } from 'pg';
import { loadDatabaseConfig } from '../config/config';
import { ScoringQueue } from './scoring-queue';
import { ScoringRunner } from './scoring-runner';

async function main(): Promise<void> {
  const db = loadDatabaseConfig();
  const quiet =
    process.env.KINPATH_LOG_LEVEL === 'warn' || process.env.KINPATH_LOG_LEVEL === 'error';
  // The server's log format: one JSON object per line unless KINPATH_LOG_FORMAT=text.
  const json = (process.env.KINPATH_LOG_FORMAT ?? 'json').toLowerCase() !== 'text';
  const log = (message: string) => {
    if (quiet) return;
    process.stdout.write(
      json
        ? `${JSON.stringify({ level: 'log', pid: process.pid, timestamp: Date.now(), message, context: 'ScoringWorker' })}\n`
        : `kinpath scoring worker ${process.pid}: ${message}\n`,
    );
  };
  const pool = new Pool({
    host: db.host,
    port: db.port,
    database: db.name,
    user: db.user,
    password: db.password,
    max: 3,
    application_name: 'kinpath-scoring-worker',
  });
  // An idle connection dropped by the server is not a reason to stop.
  pool.on('error', (error) => log(`database: ${error.message}`));
  const queue = new ScoringQueue(db, (error) => log(`job queue: ${error.message}`));
  await queue.start();
  const runner = new ScoringRunner(pool, (jobs) => queue.send(jobs), {
    worker: `${hostname()}:${process.pid}`,
    log,
  });
  await queue.work((job) => runner.handle(job));
  log('waiting for scoring jobs');

  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    await queue.stop();
    await pool.end().catch(() => undefined);
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop());
  process.on('SIGINT', () => void stop());
  // Started by the server: leave with it.
  process.on('disconnect', () => void stop());
}

main().catch((error: Error) => {
  process.stderr.write(`kinpath scoring worker: ${error.message}\n`);
  process.exit(1);
});
