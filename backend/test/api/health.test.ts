import { describe, expect, it } from 'vitest';
import { api } from '../support/api';

describe('health and the web surface', () => {
  it('reports the database up, without signing in', async () => {
    const res = await api().get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok', database: 'up' });
  });

  it('answers an unknown API path with a JSON 404', async () => {
    const res = await api().get('/api/no-such-route');
    expect(res.status).toBe(404);
    expect(res.body).toMatchObject({ statusCode: 404, error: 'Not Found' });
  });

  it('serves the web client, or a page saying it is not built, for deep links', async () => {
    const res = await api().get('/advisor/students/some-ref').set('Accept', 'text/html');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/html/);
    expect(res.text).toMatch(/Kinpath|<div id="root">/);
  });

  it('sends a strict Content-Security-Policy', async () => {
    const res = await api().get('/');
    const csp = res.headers['content-security-policy'] as string;
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toContain("frame-ancestors 'none'");
  });

  it("publishes the OpenAPI document with each route's access", async () => {
    const res = await api().get('/api/docs-json');
    expect(res.status).toBe(200);
    const paths = res.body.paths as Record<string, Record<string, Record<string, unknown>>>;
    expect(paths['/api/users'].get['x-kinpath-roles']).toEqual(['admin']);
    expect(paths['/api/users'].get.description).toContain('Access: admin.');
    expect(paths['/api/health'].get['x-kinpath-public']).toBe(true);
    expect(paths['/api/auth/me'].get.description).toContain('any signed-in user');
    const ui = await api().get('/api/docs');
    expect(ui.status).toBe(200);
    expect(ui.text).not.toMatch(/<script>(?!\s*<\/script>)/);
  });
});
