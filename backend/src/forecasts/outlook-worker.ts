/**
 * An outlook worker process: computes the demand outlook runs the server queues, nothing else.
 *
 *   node backend/dist/forecasts/outlook-worker.js     (the server's KINPATH_DB_* settings)
 *
 * Start more of them, here or on other machines sharing the database, to compute runs of
 * several terms at once; one run is computed by one process.
 */
import { hostname } from 'node:os';
import { Pool } from 'pg';
import { loadDatabaseConfig } from '../config/config';
import { OutlookQueue } from './outlook-queue';
import { OutlookRunner } from './outlook-runner';

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
        ? `${JSON.stringify({ level: 'log', pid: process.pid, timestamp: Date.now(), message, context: 'OutlookWorker' })}\n`
        : `kinpath outlook worker ${process.pid}: ${message}\n`,
    );
  };
  const pool = new Pool({
    host: db.host,
    port: db.port,
    database: db.name,
    user: db.user,
    password: db.password,
    max: 3,
    application_name: 'kinpath-outlook-worker',
  });
  // An idle connection dropped by the server is not a reason to stop.
  pool.on('error', (error) => log(`database: ${error.message}`));
  const queue = new OutlookQueue(db, (error) => log(`job queue: ${error.message}`));
  await queue.start();
  const runner = new OutlookRunner(pool, {
    worker: `${hostname()}:${process.pid}`,
    log,
  });
  await queue.work((job) => runner.handle(job));
  log('waiting for outlook runs');

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
  process.stderr.write(`kinpath outlook worker: ${error.message}\n`);
  process.exit(1);
});
