#!/usr/bin/env node
// `npm start`: everything from a fresh clone to a running Kinpath on
// http://127.0.0.1:$PORT — dependencies, PostgreSQL, migrations (run by the
// server at boot), demo data, the mail catcher, the build, the server.
import { spawn } from 'node:child_process';
import { join } from 'node:path';
import { ensureDatabase, startCluster } from './db.mjs';
import { profileDir, repoRoot } from './lib/paths.mjs';
import { fail, portInUse } from './lib/run.mjs';
import { buildAll, ensureDemoFiles, ensureDependencies, waitForHealth } from './lib/setup.mjs';

if (Number(process.versions.node.split('.')[0]) < 20) fail('Kinpath needs Node.js 20.19 or newer.');

ensureDependencies();
// The mail catcher needs the installed packages, so it is loaded after them.
const { MAIL_DEFAULTS, mailDir, startMailCatcher } = await import('./mail-catcher.mjs');

const port = process.env.PORT ?? '3000';
const demo = (process.env.KINPATH_DEMO ?? 'on') !== 'off';
const dataDir = process.env.KINPATH_DATA_DIR ?? profileDir('start');

// Before the long steps: a taken server port is one sentence naming the setting.
if (portInUse(Number(port))) {
  fail(`port ${port} on 127.0.0.1 is in use by another program; set PORT to a free port.`);
}

const db = startCluster('start');
ensureDatabase(db);
buildAll();
const demoDir = demo ? ensureDemoFiles(join(dataDir, 'demo')) : undefined;

const smtpPort = MAIL_DEFAULTS.start.smtpPort;
const mail = await startMailCatcher({ ...MAIL_DEFAULTS.start, dir: mailDir('start') }).catch(
  (error) => {
    if (!error.friendly) throw error;
    console.error(error.message);
    process.exit(1);
  },
);

const server = spawn(process.execPath, [join(repoRoot, 'backend', 'dist', 'main.js')], {
  cwd: repoRoot,
  stdio: 'inherit',
  env: {
    ...process.env,
    HOST: '127.0.0.1',
    PORT: port,
    KINPATH_DB_HOST: db.host,
    KINPATH_DB_PORT: String(db.port),
    KINPATH_DB_NAME: db.database,
    KINPATH_DB_USER: db.user,
    KINPATH_DB_PASSWORD: db.password,
    KINPATH_DATA_DIR: dataDir,
    KINPATH_DEMO: demo ? 'on' : 'off',
    ...(demoDir ? { KINPATH_DEMO_DIR: demoDir } : {}),
    KINPATH_SMTP_HOST: '127.0.0.1',
    KINPATH_SMTP_PORT: String(smtpPort),
    KINPATH_STATIC_DIR: join(repoRoot, 'frontend', 'dist'),
  },
});

let stopping = false;
const stop = (signal) => {
  if (stopping) return;
  stopping = true;
  server.kill(signal);
};
process.on('SIGINT', () => stop('SIGINT'));
process.on('SIGTERM', () => stop('SIGTERM'));
server.on('exit', async (code) => {
  await mail.close();
  console.log('kinpath: stopped. The database keeps running; `npm run db:stop` stops it.');
  process.exit(stopping ? 0 : (code ?? 1));
});

waitForHealth(`http://127.0.0.1:${port}`, { child: server })
  .then(() => {
    console.log(`\nKinpath is running at http://127.0.0.1:${port}`);
    // The server itself prints the demo sign-ins when it loaded them.
    console.log(`Caught e-mail: ${mail.url} (or \`npm run mail\`). Ctrl-C stops the server.`);
  })
  .catch((error) => {
    console.error(`kinpath: ${error.message}`);
    stop('SIGTERM');
  });
