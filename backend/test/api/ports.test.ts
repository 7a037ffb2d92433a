import { createServer, type Server } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freePort, runServerToExit } from '../support/server';

let blocker: Server;
let taken: number;

beforeAll(async () => {
  taken = await freePort();
  blocker = createServer();
  await new Promise<void>((resolve) => blocker.listen(taken, '127.0.0.1', resolve));
});

afterAll(() => new Promise<void>((resolve) => blocker.close(() => resolve())));

describe('start-up on a port in use', () => {
  it('stops with one sentence naming PORT, not a stack trace', async () => {
    const { code, output } = await runServerToExit({ PORT: String(taken), KINPATH_DEMO: 'off' });
    expect(code).toBe(1);
    expect(output).toContain(
      `Kinpath cannot start: port ${taken} on 127.0.0.1 is in use by another program; set PORT to a free port.`,
    );
    expect(output).not.toMatch(/EADDRINUSE|\n\s+at /);
  });
});
