import { createHash } from 'node:crypto';
import { createReadStream, mkdirSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { join } from 'node:path';

/** Where uploads live while an import needs them: `<KINPATH_DATA_DIR>/uploads`. */
export function uploadsDir(dataDir: string): string {
  const dir = join(dataDir, 'uploads');
  mkdirSync(dir, { recursive: true, mode: 0o700 });
  return dir;
}

/** The file as uploaded; it holds raw student numbers, so it is deleted once validated. */
export const uploadPath = (dataDir: string, importId: string) =>
  join(uploadsDir(dataDir), `${importId}.upload.csv`);

/** The accepted rows in stored form (pseudonyms only), kept until the commit. */
export const acceptedPath = (dataDir: string, importId: string) =>
  join(uploadsDir(dataDir), `${importId}.accepted.csv`);

export async function sha256OfFile(path: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) {
    hash.update(chunk as Buffer);
  }
  return hash.digest('hex');
}

export async function removeQuietly(path: string | undefined): Promise<void> {
  if (path) await rm(path, { force: true }).catch(() => undefined);
}

/** The upload limit in bytes, from KINPATH_UPLOAD_LIMIT_MB (200 by default). */
export function uploadLimitMb(env: Record<string, string | undefined> = process.env): number {
  const raw = env.KINPATH_UPLOAD_LIMIT_MB?.trim();
  if (!raw) return 200;
  const value = Number(raw);
  if (!Number.isFinite(value) || value <= 0) {
    throw new Error(
      `KINPATH_UPLOAD_LIMIT_MB must be a positive number of megabytes, not '${raw}'.`,
    );
  }
  return value;
}
