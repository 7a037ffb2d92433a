import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { emptyDemoDir, RECORDS_HEADER, registrarToken, upload } from '../support/imports';
import { startServer, type TestServer } from '../support/server';

let server: TestServer;

beforeAll(async () => {
  server = await startServer({ KINPATH_DEMO_DIR: emptyDemoDir(), KINPATH_UPLOAD_LIMIT_MB: '1' });
}, 60_000);

afterAll(async () => {
  await server?.stop();
});

describe('the upload limit', () => {
  it('answers 413 with the limit for a file over KINPATH_UPLOAD_LIMIT_MB, and takes one under it', async () => {
    const token = await registrarToken(server.url);
    const row = 'HX1000001,2025-FA,CMP 2310,A,4,3\n';
    const big = RECORDS_HEADER + row.repeat(Math.ceil((1.2 * 1024 * 1024) / row.length));
    const res = await upload(server.url, token, 'records', big);
    expect(res.status).toBe(413);
    expect(res.body.message).toBe(
      'The file is larger than the upload limit of 1 MB (KINPATH_UPLOAD_LIMIT_MB).',
    );
    const small = await upload(server.url, token, 'records', RECORDS_HEADER + row);
    expect(small.status).toBe(202);
  });
});
