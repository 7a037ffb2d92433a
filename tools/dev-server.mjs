#!/usr/bin/env node
// A server of your own for development and browser checks, on the test cluster:
//
//   node tools/dev-server.mjs --port 3301 --database kinpath_dev_mine [--fresh] [--smtp-port 2545]
//
// Builds nothing: run `npm run build` first. Loads the Halden Reach demo into an
// empty database, catches mail into .data/dev/<database>/mail, stops on Ctrl-C.
import { join } from 'node:path';
import { ensureDatabase, startCluster } from './db.mjs';
import { profileDir, repoRoot } from './lib/paths.mjs';
import { fail } from './lib/run.mjs';
import { ensureDemoFiles, startServer, stopProcess } from './lib/setup.mjs';
import { startMailCatcher } from './mail-catcher.mjs';

const args = process.argv.slice(2);
const option = (name, fallback) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : fallback;
};
const port = option('--port', '3301');
const database = option('--database', 'kinpath_dev');
if (!/^kinpath_[a-z0-9_]+$/.test(database))
  fail('--database must look like kinpath_dev_something.');
const smtpPort = Number(option('--smtp-port', String(2540 + (Number(port) % 50))));

const db = startCluster('test');
ensureDatabase(db, database, { fresh: args.includes('--fresh') });
const home = join(profileDir('dev'), database);
const mail = await startMailCatcher({
  smtpPort,
  httpPort: smtpPort + 1000,
  dir: join(home, 'mail'),
});
const server = await startServer({
  HOST: '127.0.0.1',
  PORT: port,
  KINPATH_DB_HOST: db.host,
  KINPATH_DB_PORT: String(db.port),
  KINPATH_DB_NAME: database,
  KINPATH_DB_USER: db.user,
  KINPATH_DB_PASSWORD: db.password,
  KINPATH_DATA_DIR: join(home, 'server'),
  KINPATH_DEMO: 'on',
  KINPATH_DEMO_DIR: ensureDemoFiles(join(profileDir('dev'), 'demo')),
  KINPATH_PSEUDONYM_KEY: 'halden-test-pseudonym-key',
  KINPATH_SMTP_HOST: '127.0.0.1',
  KINPATH_SMTP_PORT: String(smtpPort),
  KINPATH_STATIC_DIR: join(repoRoot, 'frontend', 'dist'),
});
console.log(
  `kinpath: dev server on http://127.0.0.1:${port} (database ${database}); mail in ${join(home, 'mail')} and ${mail.url}`,
);
const stop = async () => {
  await stopProcess(server);
  await mail.close();
  process.exit(0);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
