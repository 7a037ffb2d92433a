#!/usr/bin/env node
// The project's own PostgreSQL cluster: created in a git-ignored folder, run as
// the `postgres` system user when we are root (the server refuses root), and
// listening on 127.0.0.1 only.
//
//   node tools/db.mjs start [--profile start|test]   create if needed, start, ensure the database
//   node tools/db.mjs stop  [--profile start|test]
//   node tools/db.mjs status [--profile start|test]
import { randomBytes } from 'node:crypto';
import {
  chmodSync,
  existsSync,
  mkdirSync,
  readFileSync,
  readdirSync,
  writeFileSync,
  appendFileSync,
} from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { pathToFileURL } from 'node:url';
import { fallbackDir, profileDir } from './lib/paths.mjs';
import { aptInstall, fail, isRoot, portInUse } from './lib/run.mjs';

const PROFILE_DEFAULTS = {
  start: { port: 54329, database: 'kinpath' },
  test: { port: 54339, database: 'kinpath_test' },
};

function findServerBin() {
  const base = '/usr/lib/postgresql';
  if (!existsSync(base)) return null;
  const versions = readdirSync(base)
    .filter(
      (v) =>
        existsSync(join(base, v, 'bin', 'initdb')) && existsSync(join(base, v, 'bin', 'pg_ctl')),
    )
    .sort((a, b) => Number(b) - Number(a));
  return versions.length ? join(base, versions[0], 'bin') : null;
}

export function serverBin() {
  let bin = findServerBin();
  if (!bin) {
    aptInstall(['postgresql'], 'the PostgreSQL server');
    bin = findServerBin();
    if (!bin)
      fail(
        'PostgreSQL was installed but its server binaries were not found under /usr/lib/postgresql.',
      );
  }
  return bin;
}

/** Runs a PostgreSQL binary as the cluster's owner: `postgres` when we are root, ourselves otherwise. */
function asOwner(command, args, options = {}) {
  const [cmd, argv] = isRoot
    ? ['runuser', ['-u', 'postgres', '--', command, ...args]]
    : [command, args];
  return spawnSync(cmd, argv, { cwd: '/', encoding: 'utf8', ...options });
}

function ownerCanEnter(dir) {
  if (!isRoot) return true;
  return (
    spawnSync('runuser', ['-u', 'postgres', '--', 'test', '-x', dir], { cwd: '/' }).status === 0
  );
}

/** Picks the cluster's folder: inside the clone when `postgres` can reach it, else a folder under /var/tmp. */
function clusterHome(profile) {
  const home = profileDir(profile);
  mkdirSync(home, { recursive: true });
  if (ownerCanEnter(home)) return { home, fallback: false };
  const other = fallbackDir(profile);
  mkdirSync(other, { recursive: true, mode: 0o755 });
  return { home: other, fallback: true };
}

export function settingsFor(profile = 'start') {
  const defaults = PROFILE_DEFAULTS[profile];
  if (!defaults) fail(`unknown database profile "${profile}" (start or test).`);
  const port = Number(
    (profile === 'test' ? process.env.KINPATH_TEST_DB_PORT : process.env.KINPATH_DB_PORT) ??
      defaults.port,
  );
  return { profile, port, database: defaults.database };
}

function credentials(profile) {
  const file = join(profileDir(profile), 'db.json');
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8'));
  mkdirSync(profileDir(profile), { recursive: true });
  const creds = { user: 'kinpath', password: randomBytes(18).toString('base64url') };
  writeFileSync(file, JSON.stringify(creds, null, 2), { mode: 0o600 });
  return creds;
}

function psql(ctx, sql, database = 'postgres') {
  const r = asOwner(join(ctx.bin, 'psql'), [
    '-X',
    '-q',
    '-v',
    'ON_ERROR_STOP=1',
    '-h',
    ctx.socketDir,
    '-p',
    String(ctx.port),
    '-U',
    'postgres',
    '-d',
    database,
    '-tA',
    '-c',
    sql,
  ]);
  if (r.status !== 0) throw new Error(`psql failed: ${r.stderr.trim()}`);
  return r.stdout.trim();
}

function context(profile) {
  const bin = serverBin();
  const { port, database } = settingsFor(profile);
  const { home, fallback } = clusterHome(profile);
  return {
    bin,
    port,
    database,
    profile,
    fallback,
    dataDir: join(home, 'pg'),
    socketDir: join(home, 'pg-socket'),
  };
}

function initCluster(ctx) {
  for (const dir of [ctx.dataDir, ctx.socketDir]) {
    mkdirSync(dir, { recursive: true, mode: 0o700 });
    if (isRoot) spawnSync('chown', ['postgres:postgres', dir]);
    chmodSync(dir, 0o700);
  }
  // The socket lives in a folder only the owner can enter, so local trust is safe;
  // TCP on loopback needs the generated password.
  const init = asOwner(join(ctx.bin, 'initdb'), [
    '-D',
    ctx.dataDir,
    '-U',
    'postgres',
    '--auth-local=trust',
    '--auth-host=scram-sha-256',
    '-E',
    'UTF8',
    '--locale=C.UTF-8',
  ]);
  if (init.status !== 0) fail(`initdb failed: ${init.stderr.trim()}`);
  const lines = [
    `listen_addresses = '127.0.0.1'`,
    `unix_socket_directories = '${ctx.socketDir}'`,
    `shared_buffers = '256MB'`,
    `max_connections = 200`,
    `work_mem = '32MB'`,
    `maintenance_work_mem = '256MB'`,
  ];
  // The test cluster is rebuilt at will: durability on power loss buys nothing there.
  if (ctx.profile === 'test')
    lines.push('fsync = off', 'synchronous_commit = off', 'full_page_writes = off');
  const conf = join(ctx.dataDir, 'postgresql.conf');
  const append = lines.join('\n') + '\n';
  if (isRoot) {
    const r = asOwner('sh', ['-c', `cat >> '${conf}'`], { input: append });
    if (r.status !== 0) fail(`could not write ${conf}: ${r.stderr}`);
  } else {
    appendFileSync(conf, append);
  }
}

function isRunning(ctx) {
  return asOwner(join(ctx.bin, 'pg_ctl'), ['-D', ctx.dataDir, 'status']).status === 0;
}

export function startCluster(profile = 'start') {
  const ctx = context(profile);
  if (ctx.fallback) {
    console.log(
      `kinpath: the postgres user cannot enter this clone's folder, so the ${profile} cluster lives in ${ctx.dataDir}.`,
    );
  }
  if (!existsSync(join(ctx.dataDir, 'PG_VERSION'))) initCluster(ctx);
  if (!isRunning(ctx)) {
    if (portInUse(ctx.port)) {
      const variable = profile === 'test' ? 'KINPATH_TEST_DB_PORT' : 'KINPATH_DB_PORT';
      fail(
        `port ${ctx.port} on 127.0.0.1, where the ${profile} PostgreSQL cluster listens, is in use by another program; set ${variable} to a free port.`,
      );
    }
    const r = asOwner(join(ctx.bin, 'pg_ctl'), [
      '-D',
      ctx.dataDir,
      '-l',
      join(ctx.dataDir, 'server.log'),
      '-w',
      '-t',
      '60',
      '-o',
      `-p ${ctx.port}`,
      'start',
    ]);
    if (r.status !== 0) {
      fail(
        `PostgreSQL did not start on 127.0.0.1:${ctx.port} (see ${join(ctx.dataDir, 'server.log')}): ${r.stderr.trim()}`,
      );
    }
  }
  const creds = credentials(profile);
  const role = psql(ctx, `SELECT 1 FROM pg_roles WHERE rolname = '${creds.user}'`);
  const verb = role === '1' ? 'ALTER' : 'CREATE';
  psql(ctx, `${verb} ROLE ${creds.user} WITH LOGIN CREATEDB PASSWORD '${creds.password}'`);
  return { ...ctx, ...creds, host: '127.0.0.1' };
}

/** Creates the database when missing; with `fresh`, drops it first. */
export function ensureDatabase(ctx, name = ctx.database, { fresh = false } = {}) {
  if (fresh) psql(ctx, `DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
  const exists = psql(ctx, `SELECT 1 FROM pg_database WHERE datname = '${name}'`);
  if (exists !== '1') psql(ctx, `CREATE DATABASE ${name} OWNER ${ctx.user}`);
  return name;
}

export function stopCluster(profile = 'start') {
  const ctx = context(profile);
  if (!existsSync(join(ctx.dataDir, 'PG_VERSION')) || !isRunning(ctx)) {
    console.log(`kinpath: the ${profile} database is not running.`);
    return;
  }
  const r = asOwner(join(ctx.bin, 'pg_ctl'), ['-D', ctx.dataDir, '-m', 'fast', '-w', 'stop']);
  if (r.status !== 0) fail(`could not stop PostgreSQL: ${r.stderr.trim()}`);
  console.log(`kinpath: stopped the ${profile} database.`);
}

/** The libpq variables for a database of this cluster. */
export function pgEnv(ctx, database = ctx.database) {
  return {
    PGHOST: ctx.host,
    PGPORT: String(ctx.port),
    PGUSER: ctx.user,
    PGPASSWORD: ctx.password,
    PGDATABASE: database,
  };
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  const [command = 'status', ...rest] = process.argv.slice(2);
  const i = rest.indexOf('--profile');
  const profile = i >= 0 ? rest[i + 1] : 'start';
  if (command === 'start') {
    const ctx = startCluster(profile);
    ensureDatabase(ctx);
    console.log(
      `kinpath: PostgreSQL (${profile}) on 127.0.0.1:${ctx.port}, database ${ctx.database}.`,
    );
  } else if (command === 'stop') {
    stopCluster(profile);
  } else if (command === 'status') {
    const ctx = context(profile);
    console.log(
      isRunning(ctx) ? `running on 127.0.0.1:${ctx.port} (${ctx.dataDir})` : 'not running',
    );
  } else {
    fail(`unknown command "${command}" (start, stop or status).`);
  }
}
