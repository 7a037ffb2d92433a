import { execFile } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer } from '../support/api';
import {
  CATALOGUE,
  emptyDemoDir,
  OFFERINGS,
  RECORDS_HEADER,
  registrarToken,
  STUDENTS,
} from '../support/imports';
import { startServer, type TestServer } from '../support/server';

/** The script docs/api.md shows, run as a student information system would run it. */
const ROOT = resolve(__dirname, '..', '..', '..');
const SCRIPT = join(ROOT, 'tools', 'nightly-import.sh');

let server: TestServer;
let token: string;
let work: string;

const RECORDS =
  RECORDS_HEADER + 'HX1000001,2025-SP,CMP 1100,B+,4,3\nHX1000002,2025-SP,MTH 1200,A-,,4\n';

/** The four term data files in one folder (removed after the test: they hold student numbers). */
function folder(name: string, files: Record<string, string>): string {
  const dir = join(work, name);
  mkdirSync(dir);
  for (const [kind, csv] of Object.entries(files)) writeFileSync(join(dir, `${kind}.csv`), csv);
  return dir;
}

function run(dir: string): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((done) => {
    execFile(
      'bash',
      [SCRIPT, dir],
      {
        env: {
          PATH: process.env.PATH,
          KINPATH_URL: server.url,
          KINPATH_TOKEN: token,
          KINPATH_POLL_SECONDS: '0.2',
        },
        timeout: 120_000,
      },
      (error, stdout, stderr) =>
        done({ code: error ? ((error.code as number) ?? 1) : 0, stdout, stderr }),
    );
  });
}

async function imports(session: string) {
  const res = await request(server.url)
    .get('/api/imports')
    .set(...bearer(session));
  expect(res.status).toBe(200);
  return res.body as Array<{ id: string; kind: string; status: string; createdAt: string }>;
}

beforeAll(async () => {
  server = await startServer({ KINPATH_DEMO_DIR: emptyDemoDir() });
  work = mkdtempSync(join(tmpdir(), 'kinpath-nightly-'));
}, 120_000);

afterAll(async () => {
  if (work) rmSync(work, { recursive: true, force: true });
  await server?.stop();
});

describe('the nightly import script', () => {
  it('is the script docs/api.md shows', () => {
    const docs = readFileSync(join(ROOT, 'docs', 'api.md'), 'utf8');
    const block = /```sh\n(#!\/usr\/bin\/env bash\n[\s\S]*?)```/.exec(docs)?.[1];
    expect(block).toBe(readFileSync(SCRIPT, 'utf8'));
  });

  it('commits the four files in order with a script token, then stops at the first failing file with its rejected rows saved', async () => {
    const session = await registrarToken(server.url);
    const created = await request(server.url)
      .post('/api/api-tokens')
      .set(...bearer(session))
      .send({
        name: 'Student information system',
        scopes: ['imports:write', 'imports:read'],
        expiresOn: new Date(Date.now() + 30 * 86_400_000).toISOString().slice(0, 10),
      });
    expect(created.status, created.text).toBe(201);
    token = created.body.secret;

    const good = folder('good', {
      catalogue: CATALOGUE,
      offerings: OFFERINGS,
      students: STUDENTS,
      records: RECORDS,
    });
    const ok = await run(good);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stdout).toContain('all four files are committed');
    expect(ok.stdout + ok.stderr).not.toContain(token);
    const first = await imports(session);
    expect(first).toHaveLength(4);
    // Newest first: the files went in catalogue, offerings, students, records.
    expect(first.map((i) => i.kind).reverse()).toEqual([
      'catalogue',
      'offerings',
      'students',
      'records',
    ]);
    expect(first.every((i) => i.status === 'committed')).toBe(true);

    const bad = folder('bad', {
      catalogue: CATALOGUE,
      offerings: OFFERINGS,
      students: STUDENTS + 'HX1000003,Arts BA,not-a-term,active\n',
      records: RECORDS,
    });
    const failed = await run(bad);
    expect(failed.code).not.toBe(0);
    // The unchanged files are not sent again.
    expect(failed.stdout).toMatch(/catalogue is unchanged since its last import; skipped/);
    expect(failed.stdout).toMatch(/offerings is unchanged since its last import; skipped/);
    expect(failed.stderr).toMatch(/students was not committed \(validated\)/);
    expect(failed.stderr).toMatch(/the files after students were not imported/);
    const after = await imports(session);
    // Only the failing students file went up; records never did.
    expect(after).toHaveLength(5);
    expect(after[0]).toMatchObject({ kind: 'students', status: 'validated' });
    const reports = readdirSync(bad).filter((f) => f.startsWith('rejected-'));
    expect(reports).toEqual([`rejected-students-${after[0].id}.csv`]);
    const report = readFileSync(join(bad, reports[0]), 'utf8');
    expect(report.split('\r\n')[0]).toBe('line,column,value,reason');
    expect(report).toMatch(/^4,entry_term,/m);
  }, 180_000);
});
