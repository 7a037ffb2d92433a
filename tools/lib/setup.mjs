// Steps shared by `npm start`, `npm test` and `npm run bench`: dependencies,
// build, demo files and the server process.
import { spawn } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { repoRoot } from './paths.mjs';
import { fail, run } from './run.mjs';
import { writeDemo } from '../demo/generate.mjs';

export function ensureDependencies() {
  const marker = join(repoRoot, 'node_modules', '.package-lock.json');
  const lock = join(repoRoot, 'package-lock.json');
  if (existsSync(marker) && statSync(marker).mtimeMs >= statSync(lock).mtimeMs) return;
  console.log('kinpath: installing dependencies (npm ci)…');
  try {
    run('npm', ['ci', '--no-audit', '--no-fund'], { cwd: repoRoot });
  } catch {
    fail('npm ci failed; check the network access to the npm registry and run again.');
  }
}

export function buildAll() {
  console.log('kinpath: building contracts, engine, backend and frontend…');
  try {
    run('npm', ['run', 'build', '--silent'], { cwd: repoRoot });
  } catch {
    fail('the build failed (see above).');
  }
}

export function ensureDemoFiles(dir) {
  if (existsSync(join(dir, 'records.csv'))) return dir;
  const data = writeDemo(dir);
  console.log(
    `kinpath: generated the Halden Reach demo files (${data.records.length} records) in ${dir}.`,
  );
  return dir;
}

export async function waitForHealth(url, { timeoutMs = 120_000, child } = {}) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (child && child.exitCode !== null)
      throw new Error(`the server exited with code ${child.exitCode}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`the server at ${url} did not become healthy in ${timeoutMs / 1000} s`);
}

/** Starts the built server with the given environment; resolves once it answers. */
export async function startServer(env, { stdio = 'inherit' } = {}) {
  const child = spawn(process.execPath, [join(repoRoot, 'backend', 'dist', 'main.js')], {
    cwd: repoRoot,
    env: { ...process.env, ...env },
    stdio,
  });
  await waitForHealth(`http://${env.HOST ?? '127.0.0.1'}:${env.PORT}`, { child });
  return child;
}

export function stopProcess(child, timeoutMs = 10_000) {
  if (!child || child.exitCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    const timer = setTimeout(() => child.kill('SIGKILL'), timeoutMs);
    child.once('exit', () => {
      clearTimeout(timer);
      resolve();
    });
    child.kill('SIGTERM');
  });
}
