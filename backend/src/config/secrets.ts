import { randomBytes } from 'node:crypto';
import { chmodSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

/**
 * Reads a secret kept in the data folder, creating it (owner-only, 0600) on
 * first use, so no secret is ever a constant in the code.
 */
export function readOrCreateSecret(dataDir: string, fileName: string): string {
  const path = join(dataDir, fileName);
  try {
    const value = readFileSync(path, 'utf8').trim();
    if (value.length >= 32) {
      if ((statSync(path).mode & 0o077) !== 0) chmodSync(path, 0o600);
      return value;
    }
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error;
  }
  const value = randomBytes(48).toString('hex');
  // 'wx' fails if another process created the file meanwhile; then read theirs.
  try {
    writeFileSync(path, `${value}\n`, { mode: 0o600, flag: 'wx' });
    return value;
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'EEXIST') {
      return readFileSync(path, 'utf8').trim();
    }
    throw error;
  }
}
