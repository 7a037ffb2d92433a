import { createConnection, createServer, type Server, type Socket } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, DEMO_USERS, signIn } from '../support/api';
import { emptyDemoDir } from '../support/imports';
import { freePort, startServer, type TestServer } from '../support/server';

/**
 * The database going away under a running server: a TCP proxy stands between the
 * server and the test cluster; closing it (and cutting its open connections) is
 * the database going down, reopening it is the database coming back.
 */
class DatabaseProxy {
  private server: Server | null = null;
  private readonly sockets = new Set<Socket>();

  constructor(
    readonly port: number,
    private readonly target: { host: string; port: number },
  ) {}

  open(): Promise<void> {
    if (this.server) return Promise.resolve();
    const server = createServer((client) => {
      const upstream = createConnection(this.target);
      for (const socket of [client, upstream]) {
        this.sockets.add(socket);
        socket.on('close', () => this.sockets.delete(socket));
        socket.on('error', () => socket.destroy());
      }
      client.pipe(upstream).pipe(client);
      client.on('close', () => upstream.destroy());
      upstream.on('close', () => client.destroy());
    });
    this.server = server;
    return new Promise((resolve, reject) => {
      server.once('error', reject);
      server.listen(this.port, '127.0.0.1', () => resolve());
    });
  }

  close(): Promise<void> {
    for (const socket of this.sockets) socket.destroy();
    this.sockets.clear();
    const server = this.server;
    this.server = null;
    return new Promise((resolve) => (server ? server.close(() => resolve()) : resolve()));
  }
}

let proxy: DatabaseProxy;
let server: TestServer;
let token: string;

beforeAll(async () => {
  proxy = new DatabaseProxy(await freePort(), {
    host: process.env.PGHOST ?? '127.0.0.1',
    port: Number(process.env.PGPORT ?? 5432),
  });
  await proxy.open();
  server = await startServer({
    KINPATH_DEMO_DIR: emptyDemoDir(),
    KINPATH_DB_PORT: String(proxy.port),
  });
  token = await signIn(DEMO_USERS.registrar, undefined, server.url);
}, 90_000);

afterAll(async () => {
  await proxy?.open();
  await server?.stop();
  await proxy?.close();
});

async function timed(req: request.Test) {
  const started = Date.now();
  const res = await req.timeout(10_000);
  return { res, ms: Date.now() - started };
}

describe('the database goes away while the server runs', () => {
  it('reports down, answers 503 quickly instead of hanging, and recovers by itself', async () => {
    expect((await request(server.url).get('/api/health')).body).toEqual({
      status: 'ok',
      database: 'up',
    });

    await proxy.close();

    const health = await timed(request(server.url).get('/api/health'));
    expect(health.res.status).toBe(503);
    expect(health.res.body).toEqual({ status: 'degraded', database: 'down' });
    expect(health.ms).toBeLessThan(5_000);

    // A signed-in read, a sign-in and a write: each a quick 503, never a 401 that
    // would sign the user out, never a hang.
    const calls = [
      request(server.url)
        .get('/api/courses')
        .set(...bearer(token)),
      request(server.url)
        .post('/api/auth/login')
        .send({ email: DEMO_USERS.registrar, password: 'kinpath-demo-2026' }),
      request(server.url)
        .get('/api/imports')
        .set(...bearer(token)),
    ];
    for (const call of calls) {
      const { res, ms } = await timed(call);
      expect(res.status, res.text).toBe(503);
      expect(res.body).toMatchObject({ statusCode: 503, error: 'Service Unavailable' });
      expect(res.body.message).toMatch(/database/i);
      expect(ms).toBeLessThan(5_000);
    }
    expect(server.process.exitCode).toBeNull();

    await proxy.open();

    const deadline = Date.now() + 20_000;
    let status = 0;
    while (Date.now() < deadline) {
      status = (await request(server.url).get('/api/health').timeout(5_000)).status;
      if (status === 200) break;
      await new Promise((r) => setTimeout(r, 250));
    }
    expect(status).toBe(200);
    const after = await request(server.url)
      .get('/api/courses')
      .set(...bearer(token));
    expect(after.status).toBe(200);
    expect(await signIn(DEMO_USERS.registrar, undefined, server.url)).toEqual(expect.any(String));
  }, 60_000);

  it('survives the database going away twice in a row', async () => {
    for (let round = 0; round < 2; round++) {
      await proxy.close();
      expect((await request(server.url).get('/api/health')).status).toBe(503);
      await proxy.open();
      const deadline = Date.now() + 20_000;
      while ((await request(server.url).get('/api/health')).status !== 200) {
        if (Date.now() > deadline) throw new Error('the server did not recover');
        await new Promise((r) => setTimeout(r, 250));
      }
    }
    expect(server.process.exitCode).toBeNull();
  }, 60_000);
});
