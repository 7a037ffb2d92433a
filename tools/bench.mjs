#!/usr/bin/env node
// `npm run bench`: every benchmark, each printing its own figures (none asserts
// a time). Runs on the test cluster in databases of its own and a server with
// the Halden Reach demo on port 3399.
//
//   npm run bench [-- --only engine,imports,electives,outlook,load,electives-full] [--full]
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { ensureDatabase, pgEnv, startCluster } from './db.mjs';
import { profileDir, repoRoot } from './lib/paths.mjs';
import {
  buildAll,
  ensureDemoFiles,
  ensureDependencies,
  startServer,
  stopProcess,
} from './lib/setup.mjs';

const args = process.argv.slice(2);
const onlyIndex = args.indexOf('--only');
const only = onlyIndex >= 0 ? new Set(args[onlyIndex + 1].split(',')) : null;
const wanted = (name) => !only || only.has(name);

ensureDependencies();
buildAll();
const db = startCluster('test');
const failures = [];

function step(name, command, commandArgs, env = {}) {
  if (!wanted(name)) return;
  console.log(`\n=== ${name}: ${command} ${commandArgs.join(' ')}`);
  const result = spawnSync(command, commandArgs, {
    cwd: repoRoot,
    stdio: 'inherit',
    env: { ...process.env, ...env },
  });
  if (result.status !== 0) failures.push(name);
}

const bench = (file) => join(repoRoot, 'backend', 'bench', file);
step('engine', 'npm', ['run', 'bench', '--silent', '-w', '@kinpath/engine']);
step('imports', process.execPath, [bench('imports.bench.mjs')], pgEnv(db, 'postgres'));
// The whole outlook with its three backtests on the engine benchmark's university: 200,000
// students, 40,000 active, 3,000 electives offered every term (`--full`), otherwise 50,000.
const outlookScale = args.includes('--full') ? [] : ['--students', '50000', '--active', '10000'];
step(
  'outlook',
  process.execPath,
  ['--expose-gc', bench('outlook.bench.mjs'), ...outlookScale],
  pgEnv(db, 'postgres'),
);

if (wanted('electives') || wanted('load')) {
  const database = ensureDatabase(db, 'kinpath_bench', { fresh: true });
  const demoDir = ensureDemoFiles(join(profileDir('test'), 'demo'));
  const port = '3399';
  console.log('\n=== starting a server with the demo data for the HTTP benchmarks…');
  const server = await startServer(
    {
      HOST: '127.0.0.1',
      PORT: port,
      KINPATH_DB_HOST: db.host,
      KINPATH_DB_PORT: String(db.port),
      KINPATH_DB_NAME: database,
      KINPATH_DB_USER: db.user,
      KINPATH_DB_PASSWORD: db.password,
      KINPATH_DATA_DIR: join(profileDir('bench'), 'server'),
      KINPATH_DEMO: 'on',
      KINPATH_DEMO_DIR: demoDir,
      KINPATH_LOG_LEVEL: 'warn',
      KINPATH_STATIC_DIR: join(repoRoot, 'frontend', 'dist'),
    },
    { stdio: ['ignore', 'ignore', 'inherit'] },
  );
  const url = `http://127.0.0.1:${port}`;
  try {
    step('electives', process.execPath, [
      bench('electives.bench.mjs'),
      '--url',
      url,
      '--demo-dir',
      demoDir,
    ]);
    step('load', process.execPath, [
      bench('load.bench.mjs'),
      url,
      '--students',
      join(demoDir, 'students.csv'),
    ]);
  } finally {
    await stopProcess(server);
  }
}

// Electives on the 200,000-student university: loading its ~8 M records and building the
// server's model take several minutes, so it runs with `--full` or when named in `--only`.
if (args.includes('--full') || only?.has('electives-full')) {
  step(
    'electives-full',
    process.execPath,
    [bench('electives-full.bench.mjs'), '--port', '3398', '--database', 'kinpath_bench_200k'],
    pgEnv(db, 'postgres'),
  );
}

console.log(
  failures.length
    ? `\nbenchmarks that failed to run: ${failures.join(', ')}`
    : '\nall benchmarks ran.',
);
process.exit(failures.length ? 1 : 0);
