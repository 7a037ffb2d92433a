// Where Kinpath keeps its local state: one git-ignored folder per profile
// (`start` for `npm start`, `test` for `npm test`) so the two never share data.
import { createHash } from 'node:crypto';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');

export function profileDir(profile) {
  return join(repoRoot, '.data', profile);
}

/** A folder outside the clone for when the `postgres` user cannot enter the clone's path. */
export function fallbackDir(profile) {
  const tag = createHash('sha256').update(repoRoot).digest('hex').slice(0, 10);
  return join('/var/tmp', `kinpath-${tag}`, profile);
}
