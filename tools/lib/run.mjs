// Small process helpers shared by the set-up scripts.
import { spawnSync } from 'node:child_process';

export function fail(sentence) {
  console.error(`kinpath: ${sentence}`);
  process.exit(1);
}

export function have(command) {
  return spawnSync('sh', ['-c', `command -v ${command}`], { stdio: 'ignore' }).status === 0;
}

export const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

/** Runs a command, inheriting output; throws with the command line when it fails. */
export function run(command, args, options = {}) {
  const result = spawnSync(command, args, { stdio: 'inherit', ...options });
  if (result.status !== 0) {
    throw new Error(`${command} ${args.join(' ')} exited with ${result.status ?? result.signal}`);
  }
  return result;
}

/** Runs a command and returns its standard output (trimmed), or throws. */
export function capture(command, args, options = {}) {
  const result = spawnSync(command, args, { encoding: 'utf8', ...options });
  if (result.status !== 0) {
    throw new Error(
      `${command} ${args.join(' ')} exited with ${result.status ?? result.signal}: ${result.stderr}`,
    );
  }
  return result.stdout.trim();
}

/** Installs Debian packages when this user may; otherwise stops with one sentence. */
export function aptInstall(packages, why) {
  if (!isRoot || !have('apt-get')) {
    fail(`${why} is missing: install the Debian package(s) ${packages.join(', ')} and run again.`);
  }
  console.log(`kinpath: installing ${packages.join(', ')} from Debian's packages…`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  const update = spawnSync('apt-get', ['update'], { stdio: 'inherit', env });
  if (update.status !== 0) fail(`apt-get update failed; install ${packages.join(', ')} by hand.`);
  const install = spawnSync('apt-get', ['install', '-y', '--no-install-recommends', ...packages], {
    stdio: 'inherit',
    env,
  });
  if (install.status !== 0) fail(`could not install ${packages.join(', ')}; install it by hand.`);
}

/**
 * Whether another program listens on host:port. Probed in a child process so the
 * synchronous set-up steps can ask it too.
 */
export function portInUse(port, host = '127.0.0.1') {
  const probe = `const s = require('node:net').createServer();
s.once('error', (e) => process.exit(e.code === 'EADDRINUSE' ? 3 : 0));
s.listen(${Number(port)}, ${JSON.stringify(host)}, () => s.close(() => process.exit(0)));`;
  return spawnSync(process.execPath, ['-e', probe], { stdio: 'ignore' }).status === 3;
}
