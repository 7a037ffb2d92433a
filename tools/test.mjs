#!/usr/bin/env node
// `npm test`: its own set-up, then every test. A test PostgreSQL cluster
// (separate from `npm start`'s), Chromium for the browser tests, the mail
// catcher, a fresh build and a running server with the demo data; then Vitest
// over every workspace, then lint. Exits non-zero on any failure.
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { spawn, spawnSync } from 'node:child_process';
import { ensureDatabase, pgEnv, startCluster, stopCluster } from './db.mjs';
import { profileDir, repoRoot } from './lib/paths.mjs';
import { aptInstall } from './lib/run.mjs';
import {
  buildAll,
  ensureDemoFiles,
  ensureDependencies,
  startServer,
  stopProcess,
} from './lib/setup.mjs';

const started = Date.now();

/** Runs a child to its end without blocking this process's event loop; resolves with its status. */
function runAsync(command, args, options) {
  return new Promise((resolve) => {
    const child = spawn(command, args, options);
    child.on('exit', (code, signal) => resolve({ status: code ?? (signal ? 1 : 0) }));
  });
}
ensureDependencies();
const { MAIL_DEFAULTS, mailDir, startMailCatcher } = await import('./mail-catcher.mjs');

if (!existsSync('/usr/bin/chromium')) aptInstall(['chromium'], 'Chromium (for the browser tests)');

const db = startCluster('test');
ensureDatabase(db, db.database, { fresh: true });
buildAll();

const dataDir = join(profileDir('test'), 'server');
rmSync(dataDir, { recursive: true, force: true });
mkdirSync(dataDir, { recursive: true });
const demoDir = ensureDemoFiles(join(profileDir('test'), 'demo'));
const mailFolder = mailDir('test');
rmSync(mailFolder, { recursive: true, force: true });
const mail = await startMailCatcher({ ...MAIL_DEFAULTS.test, dir: mailFolder }).catch((error) => {
  if (!error.friendly) throw error;
  console.error(error.message);
  process.exit(1);
});

const port = process.env.KINPATH_TEST_PORT ?? '3199';
const serverEnv = {
  HOST: '127.0.0.1',
  PORT: port,
  KINPATH_DB_HOST: db.host,
  KINPATH_DB_PORT: String(db.port),
  KINPATH_DB_NAME: db.database,
  KINPATH_DB_USER: db.user,
  KINPATH_DB_PASSWORD: db.password,
  KINPATH_DATA_DIR: dataDir,
  KINPATH_DEMO: 'on',
  KINPATH_DEMO_DIR: demoDir,
  KINPATH_PSEUDONYM_KEY: 'halden-test-pseudonym-key',
  KINPATH_SMTP_HOST: '127.0.0.1',
  KINPATH_SMTP_PORT: String(MAIL_DEFAULTS.test.smtpPort),
  KINPATH_STATIC_DIR: join(repoRoot, 'frontend', 'dist'),
  // The tests stand in for a proxy: X-Forwarded-For gives each test its own address bucket.
  KINPATH_TRUSTED_PROXIES: 'loopback',
  // Many tests share this server from one address; the limits are proved on servers of their own.
  KINPATH_RATE_LIMIT_SCALE: '100',
};

let server;
let exitCode = 1;
let summary = 'tests: 0 passed, 1 failed';
try {
  console.log('kinpath: starting the test server with the demo data…');
  server = await startServer(serverEnv, { stdio: ['ignore', 'ignore', 'inherit'] });
  const reportFile = join(profileDir('test'), 'vitest-report.json');
  rmSync(reportFile, { force: true });
  // Asynchronous on purpose: the mail catcher runs in this process and must keep answering.
  const vitest = await runAsync(
    process.execPath,
    [
      join(repoRoot, 'node_modules', 'vitest', 'vitest.mjs'),
      'run',
      '--reporter=default',
      '--reporter=json',
      `--outputFile.json=${reportFile}`,
      // `npm test -- <filters>` narrows the run (files or `--project NAME`) while developing.
      ...process.argv.slice(2),
    ],
    {
      cwd: repoRoot,
      stdio: 'inherit',
      env: {
        ...process.env,
        ...pgEnv(db),
        KINPATH_TEST_URL: `http://127.0.0.1:${port}`,
        KINPATH_TEST_SERVER_ENV: JSON.stringify(serverEnv),
        KINPATH_MAIL_DIR: mailFolder,
        KINPATH_DEMO_DIR: demoDir,
        KINPATH_MAIL_URL: mail.url,
      },
    },
  );
  console.log('\nkinpath: lint (ESLint and Prettier)…');
  const lint = spawnSync('npm', ['run', 'lint', '--silent'], { cwd: repoRoot, stdio: 'inherit' });
  let passed = 0;
  let failed = 0;
  if (existsSync(reportFile)) {
    const report = JSON.parse(readFileSync(reportFile, 'utf8'));
    passed = report.numPassedTests;
    failed = report.numFailedTests;
  }
  if (vitest.status !== 0 && failed === 0) failed = 1; // a suite that failed to load counts as a failure
  if (lint.status !== 0) console.log('kinpath: lint found problems (see above).');
  summary = `tests: ${passed} passed, ${failed} failed`;
  exitCode = vitest.status === 0 && lint.status === 0 ? 0 : 1;
} catch (error) {
  console.error(`kinpath: ${error.message}`);
} finally {
  await stopProcess(server);
  await mail.close();
  if (process.env.KINPATH_TEST_KEEP_DB !== 'on') stopCluster('test');
  console.log(`kinpath: npm test took ${Math.round((Date.now() - started) / 1000)} s.`);
}
// The last line is the count, for whoever reads only the end of the log.
console.log(`\n${summary}`);
process.exit(exitCode);
