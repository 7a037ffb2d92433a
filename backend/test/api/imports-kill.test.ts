import { type ChildProcess, spawn } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, withDatabase } from '../support/api';
import {
  emptyDemoDir,
  importCommitted,
  RECORDS_HEADER,
  registrarToken,
  upload,
} from '../support/imports';
import { createDatabase, dropDatabase, freePort, SERVER_ENTRY } from '../support/server';

/** A server we can SIGKILL and start again on the same database and data folder. */
let databaseName: string;
const dataDir = mkdtempSync(join(tmpdir(), 'kinpath-kill-'));
const demoDir = emptyDemoDir();
let child: ChildProcess | null = null;
let log = '';

async function start(): Promise<string> {
  const port = await freePort();
  const env: Record<string, string> = {};
  for (const [k, v] of Object.entries(process.env))
    if (v !== undefined && !k.startsWith('KINPATH_')) env[k] = v;
  child = spawn(process.execPath, [SERVER_ENTRY], {
    env: {
      ...env,
      HOST: '127.0.0.1',
      PORT: String(port),
      KINPATH_DB_HOST: process.env.PGHOST ?? '127.0.0.1',
      KINPATH_DB_PORT: process.env.PGPORT ?? '5432',
      KINPATH_DB_USER: process.env.PGUSER ?? 'kinpath',
      KINPATH_DB_PASSWORD: process.env.PGPASSWORD ?? '',
      KINPATH_DB_NAME: databaseName,
      KINPATH_DATA_DIR: dataDir,
      KINPATH_DEMO_DIR: demoDir,
      KINPATH_PSEUDONYM_KEY: 'halden-kill-test-pseudonym-key',
      KINPATH_LOG_LEVEL: 'warn',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout?.on('data', (c: Buffer) => (log += c.toString()));
  child.stderr?.on('data', (c: Buffer) => (log += c.toString()));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 45_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`server exited:\n${log}`);
    try {
      if ((await fetch(`${url}/api/health`)).ok) return url;
    } catch {
      // not yet listening
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`server not healthy:\n${log}`);
}

async function kill(): Promise<void> {
  const c = child;
  if (!c || c.exitCode !== null || c.signalCode !== null) return;
  const exited = new Promise((r) => c.once('exit', r));
  c.kill('SIGKILL');
  await exited;
}

/** A fingerprint of every term-data table's full contents. */
const fingerprint = () =>
  withDatabase(async (db) => {
    const out: Record<string, string> = {};
    for (const table of ['courses', 'offerings', 'students', 'records', 'import_changes']) {
      const { rows } = await db.query(
        `SELECT count(*)::int AS n, md5(coalesce(string_agg(t::text, '|' ORDER BY t::text), '')) AS h FROM ${table} t`,
      );
      out[table] = `${rows[0].n}:${rows[0].h}`;
    }
    return out;
  }, databaseName);

beforeAll(async () => {
  databaseName = await createDatabase();
}, 30_000);

afterAll(async () => {
  await kill();
  await dropDatabase(databaseName);
  rmSync(dataDir, { recursive: true, force: true });
  rmSync(demoDir, { recursive: true, force: true });
});

describe('a server killed during a commit', () => {
  it('leaves the tables as before and the import marked failed after a restart', async () => {
    let url = await start();
    const token = await registrarToken(url);
    const courses = Array.from({ length: 40 }, (_, i) => `KIL ${1000 + i * 10}`);
    await importCommitted(
      url,
      token,
      'catalogue',
      'course_code,title,department\n' +
        courses.map((c) => `${c},Course ${c},KIL`).join('\n') +
        '\n',
    );
    await importCommitted(
      url,
      token,
      'records',
      `${RECORDS_HEADER}HK0000001,2020-FA,KIL 1000,A,5,3\n`,
    );
    const before = await fingerprint();

    // 300,000 rows: 12,000 students with 25 courses each.
    const lines: string[] = [];
    for (let s = 0; s < 12_000; s++) {
      for (let k = 0; k < 25; k++) {
        lines.push(`HK${String(1_000_000 + s)},2021-FA,${courses[k]},B,3,3`);
      }
    }
    const res = await upload(url, token, 'records', RECORDS_HEADER + lines.join('\n') + '\n', {
      commit: 'true',
    });
    expect(res.status).toBe(202);
    const id = res.body.id as string;
    let status = '';
    const deadline = Date.now() + 120_000;
    while (status !== 'committing') {
      const r = await request(url)
        .get(`/api/imports/${id}`)
        .set(...bearer(token));
      status = r.body.status;
      expect(['queued', 'validating', 'validated', 'committing']).toContain(status);
      if (Date.now() > deadline) throw new Error('the commit never started');
      if (status !== 'committing') await new Promise((r2) => setTimeout(r2, 30));
    }
    await new Promise((r) => setTimeout(r, 300));
    await kill();

    url = await start();
    expect(await fingerprint()).toEqual(before);
    const token2 = await registrarToken(url);
    const after = await request(url)
      .get(`/api/imports/${id}`)
      .set(...bearer(token2));
    expect(after.body.status).toBe('failed');
    expect(after.body.message).toMatch(
      /stopped during the commit; nothing of this import was written/,
    );
    // The files of the interrupted import are gone; nothing of it is left on disk.
    expect(readdirSync(join(dataDir, 'uploads')).filter((f) => f.startsWith(id))).toEqual([]);
    // The same file may be imported again once the first attempt failed.
    const retry = await upload(
      url,
      token2,
      'records',
      `${RECORDS_HEADER}HK0000002,2020-FA,KIL 1000,B,4,3\n`,
      { commit: 'true' },
    );
    expect(retry.status).toBe(202);
  }, 240_000);
});
