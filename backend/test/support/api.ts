import request from 'supertest';
import { adminClient } from './server';

/** The server `npm test` started (demo on) before the tests. */
export function testUrl(): string {
  const url = process.env.KINPATH_TEST_URL;
  if (!url) {
    throw new Error('KINPATH_TEST_URL is not set: run the API tests through `npm test`.');
  }
  return url.replace(/\/$/, '');
}

export function api(url = testUrl()) {
  return request(url);
}

export const DEMO_PASSWORD = 'kinpath-demo-2026';
export const DEMO_USERS = {
  admin: 'admin@halden.example',
  registrar: 'registrar@halden.example',
  advisor: 'advisor@halden.example',
  department_head: 'head.cmp@halden.example',
} as const;

export async function signIn(
  email: string,
  password = DEMO_PASSWORD,
  url = testUrl(),
): Promise<string> {
  const res = await api(url).post('/api/auth/login').send({ email, password });
  if (res.status !== 200)
    throw new Error(`Sign-in as ${email} answered ${res.status}: ${res.text}`);
  return res.body.accessToken as string;
}

export function bearer(token: string): [string, string] {
  return ['Authorization', `Bearer ${token}`];
}

/** A unique address for accounts a test creates, so reruns on one database do not collide. */
export function uniqueEmail(prefix: string): string {
  return `${prefix}.${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}@halden.example`;
}

/** Runs `fn` with a client on the database of the shared test server. */
export async function withDatabase<T>(
  fn: (client: ReturnType<typeof adminClient>) => Promise<T>,
  database?: string,
): Promise<T> {
  const client = adminClient(database);
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}
