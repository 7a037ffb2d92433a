import { type ChildProcess, spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { Client } from 'pg';

/** The built server; `npm test` builds it before the tests run. */
export const SERVER_ENTRY = resolve(__dirname, '..', '..', 'dist', 'main.js');

export interface TestServer {
  url: string;
  databaseName: string;
  process: ChildProcess;
  /** Everything the server printed so far. */
  output(): string;
  stop(): Promise<void>;
}

/** A client for the test cluster, from the standard libpq variables `npm test` exports. */
export function adminClient(database = process.env.PGDATABASE): Client {
  return new Client({ database });
}

export async function freePort(): Promise<number> {
  return new Promise((resolvePort, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address();
      probe.close(() =>
        typeof address === 'object' && address
          ? resolvePort(address.port)
          : reject(new Error('no port')),
      );
    });
  });
}

/** Settings for a server of our own: our KINPATH_* only, nothing inherited from the shared one. */
function serverEnv(
  port: number,
  databaseName: string,
  dataDir: string,
  extra: Record<string, string>,
) {
  const env: Record<string, string> = {};
  for (const [name, value] of Object.entries(process.env)) {
    if (value !== undefined && !name.startsWith('KINPATH_')) env[name] = value;
  }
  return {
    ...env,
    HOST: '127.0.0.1',
    PORT: String(port),
    KINPATH_DB_HOST: process.env.PGHOST ?? '127.0.0.1',
    KINPATH_DB_PORT: process.env.PGPORT ?? '5432',
    KINPATH_DB_USER: process.env.PGUSER ?? 'kinpath',
    KINPATH_DB_PASSWORD: process.env.PGPASSWORD ?? '',
    KINPATH_DB_NAME: databaseName,
    KINPATH_DATA_DIR: dataDir,
    KINPATH_PSEUDONYM_KEY: `test-key-${randomBytes(8).toString('hex')}`,
    KINPATH_LOG_LEVEL: 'warn',
    ...extra,
  };
}

async function waitForHealth(
  url: string,
  child: ChildProcess,
  output: () => string,
): Promise<void> {
  const deadline = Date.now() + 45_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null || child.signalCode !== null) {
      throw new Error(
        `The test server exited (${child.exitCode ?? child.signalCode}):\n${output()}`,
      );
    }
    try {
      const res = await fetch(`${url}/api/health`, { signal: AbortSignal.timeout(1000) });
      if (res.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`The test server did not become healthy in time:\n${output()}`);
}

export async function createDatabase(): Promise<string> {
  const name = `kinpath_t_${randomBytes(6).toString('hex')}`;
  const client = adminClient();
  await client.connect();
  try {
    await client.query(`CREATE DATABASE ${name}`);
  } finally {
    await client.end();
  }
  return name;
}

export async function dropDatabase(name: string): Promise<void> {
  const client = adminClient();
  await client.connect();
  try {
    await client.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
  } finally {
    await client.end();
  }
}

/**
 * Spawns a server of its own on a fresh database (random name) and a free port,
 * with `env` on top of the defaults; stop() kills it and drops the database.
 */
export async function startServer(env: Record<string, string> = {}): Promise<TestServer> {
  const databaseName = await createDatabase();
  const dataDir = mkdtempSync(join(tmpdir(), 'kinpath-test-server-'));
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const child = spawn(process.execPath, [SERVER_ENTRY], {
    env: serverEnv(port, databaseName, dataDir, env),
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout?.on('data', (chunk: Buffer) => (log += chunk.toString()));
  child.stderr?.on('data', (chunk: Buffer) => (log += chunk.toString()));
  const output = () => log;

  const stop = async () => {
    if (child.exitCode === null && child.signalCode === null) {
      const exited = new Promise<void>((r) => child.once('exit', () => r()));
      child.kill('SIGTERM');
      const timer = setTimeout(() => child.kill('SIGKILL'), 10_000);
      await exited;
      clearTimeout(timer);
    }
    await dropDatabase(databaseName);
    rmSync(dataDir, { recursive: true, force: true });
  };

  try {
    await waitForHealth(url, child, output);
  } catch (error) {
    await stop();
    throw error;
  }
  return { url, databaseName, process: child, output, stop };
}

/** Runs the server until it exits by itself (for start-up refusals); returns code and output. */
export async function runServerToExit(
  env: Record<string, string>,
  timeoutMs = 30_000,
): Promise<{ code: number | null; output: string }> {
  const databaseName = await createDatabase();
  const dataDir = mkdtempSync(join(tmpdir(), 'kinpath-test-server-'));
  try {
    const port = await freePort();
    const child = spawn(process.execPath, [SERVER_ENTRY], {
      env: serverEnv(port, databaseName, dataDir, env),
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let output = '';
    child.stdout?.on('data', (chunk: Buffer) => (output += chunk.toString()));
    child.stderr?.on('data', (chunk: Buffer) => (output += chunk.toString()));
    const code = await new Promise<number | null>((resolveExit) => {
      const timer = setTimeout(() => child.kill('SIGKILL'), timeoutMs);
      child.once('exit', (exitCode) => {
        clearTimeout(timer);
        resolveExit(exitCode);
      });
    });
    return { code, output };
  } finally {
    await dropDatabase(databaseName);
    rmSync(dataDir, { recursive: true, force: true });
  }
}
