import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, withDatabase } from '../support/api';
import { startServer, type TestServer } from '../support/server';

const REPO = resolve(__dirname, '..', '..', '..');
const WORKER = resolve(__dirname, '..', '..', 'dist', 'forecasts', 'outlook-worker.js');

let server: TestServer;
const workers: ChildProcess[] = [];

function startWorker(): ChildProcess {
  const child = spawn(process.execPath, [WORKER], {
    env: {
      PATH: process.env.PATH ?? '',
      KINPATH_DB_HOST: process.env.PGHOST ?? '127.0.0.1',
      KINPATH_DB_PORT: process.env.PGPORT ?? '5432',
      KINPATH_DB_USER: process.env.PGUSER ?? 'kinpath',
      KINPATH_DB_PASSWORD: process.env.PGPASSWORD ?? '',
      KINPATH_DB_NAME: server.databaseName,
      KINPATH_LOG_LEVEL: 'warn',
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  workers.push(child);
  return child;
}

async function stopWorkers(): Promise<void> {
  await Promise.all(
    workers.splice(0).map(
      (w) =>
        new Promise<void>((r) => {
          if (w.exitCode !== null || w.signalCode !== null) return r();
          w.once('exit', () => r());
          w.kill('SIGTERM');
        }),
    ),
  );
}

const db = <T>(fn: Parameters<typeof withDatabase<T>>[0]) => withDatabase(fn, server.databaseName);

async function waitDone(runId: string): Promise<void> {
  const deadline = Date.now() + 240_000;
  for (;;) {
    const status = await db(async (c) => {
      const { rows } = await c.query(`SELECT status, error FROM outlook_runs WHERE id = $1`, [
        runId,
      ]);
      return rows[0] as { status: string; error: string | null };
    });
    if (status.status === 'done') return;
    if (status.status !== 'queued' && status.status !== 'computing')
      throw new Error(`run ${status.status}: ${status.error}`);
    if (Date.now() > deadline) throw new Error('the outlook run did not finish in time');
    await new Promise((r) => setTimeout(r, 500));
  }
}

/** Everything a run stored, without its id, in a fixed order. */
async function results(runId: string) {
  return db(async (c) => {
    const courses = await c.query(
      `SELECT term, part, course_code, expected, variance, low, high, no_history, actual, naive,
         same_term, take_up
       FROM outlook_courses WHERE run_id = $1 ORDER BY term, course_code`,
      [runId],
    );
    const run = await c.query(
      `SELECT steps_done, steps_total, summary->'terms' AS terms, summary->'theta' AS theta
       FROM outlook_runs WHERE id = $1`,
      [runId],
    );
    return { courses: courses.rows, run: run.rows[0] };
  });
}

// A smaller Halden Reach (600 students) keeps the start-up short.
const demoDir = mkdtempSync(join(tmpdir(), 'kinpath-outlook-demo-'));

beforeAll(async () => {
  execFileSync(process.execPath, [
    join(REPO, 'tools', 'demo', 'generate.mjs'),
    '--out',
    demoDir,
    '--students',
    '600',
  ]);
  // No outlook processes of the server's own: the test starts one.
  server = await startServer({
    KINPATH_OUTLOOK_PROCESSES: '0',
    KINPATH_DEMO_DIR: demoDir,
  });
}, 120_000);

afterAll(async () => {
  await stopWorkers();
  await server?.stop();
  rmSync(demoDir, { recursive: true, force: true });
});

describe('outlook runs in a separate worker process', () => {
  it('computes the run queued at start, with progress, and the same figures when asked again', async () => {
    const first = await db(async (c) => {
      const deadline = Date.now() + 60_000;
      for (;;) {
        const { rows } = await c.query(`SELECT id FROM outlook_runs ORDER BY created_at LIMIT 1`);
        if (rows[0]) return rows[0].id as string;
        if (Date.now() > deadline) throw new Error('no outlook run was queued at start');
        await new Promise((r) => setTimeout(r, 300));
      }
    });
    startWorker();
    await waitDone(first);
    const one = await results(first);
    expect(one.courses.length).toBeGreaterThan(50);
    expect(one.run.steps_total).toBeGreaterThan(1);
    expect(one.run.steps_done).toBe(one.run.steps_total);
    expect(one.run.terms).toHaveLength(3);

    const registrar = await signIn(DEMO_USERS.registrar, undefined, server.url);
    const res = await api(server.url)
      .post('/api/forecasts/runs')
      .set(...bearer(registrar))
      .send({});
    expect(res.status).toBe(202);
    await waitDone(res.body.id as string);
    const two = await results(res.body.id as string);
    expect(two).toEqual(one);
  }, 400_000);
});
