import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';

const repoRoot = resolve(decodeURIComponent(new URL('../../..', import.meta.url).pathname));

/** The demo files the server loaded: where `npm test` or the dev server put them. */
export function demoDir(): string {
  if (process.env.KINPATH_DEMO_DIR) return resolve(repoRoot, process.env.KINPATH_DEMO_DIR);
  const serverEnv = process.env.KINPATH_TEST_SERVER_ENV;
  if (serverEnv) {
    const dir = (JSON.parse(serverEnv) as { KINPATH_DEMO_DIR?: string }).KINPATH_DEMO_DIR;
    if (dir) return dir;
  }
  return join(repoRoot, '.data', 'test', 'demo');
}

export function anActiveStudentNumber(): string {
  return aStudentNumber('active');
}

/** The first demo student with this status (active, on_leave, withdrawn, graduated). */
export function aStudentNumber(wanted: string): string {
  const [header, ...lines] = readFileSync(join(demoDir(), 'students.csv'), 'utf8')
    .trim()
    .split(/\r?\n/);
  const columns = header.split(',');
  const id = columns.indexOf('student_id');
  const status = columns.indexOf('status');
  const row = lines.map((line) => line.split(',')).find((cells) => cells[status] === wanted);
  if (!row) throw new Error(`The demo has no ${wanted} student.`);
  return row[id];
}
