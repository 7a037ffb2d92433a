import { AUDIT_ACTION_LABELS } from '@kinpath/contracts';
import { beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn } from '../support/api';

interface Entry {
  actorEmail: string | null;
  action: string;
  target: string | null;
  targetLabel: string | null;
}

let admin: string;
beforeAll(async () => {
  admin = await signIn(DEMO_USERS.admin);
});

async function trail(query: Record<string, string>): Promise<{ items: Entry[]; total: number }> {
  const res = await api()
    .get('/api/audit')
    .query({ pageSize: '200', ...query })
    .set(...bearer(admin));
  expect(res.status).toBe(200);
  return res.body;
}

describe('the audit trail, readable', () => {
  it('records the demo load as the system’s, not a person’s', async () => {
    // The demo's imports are the uploads marked as the demo's; other tests import files too.
    const uploads = (await trail({ action: 'import.uploaded' })).items;
    const demoImports = new Set(uploads.filter((e) => e.detail.demo === true).map((e) => e.target));
    expect(demoImports.size).toBe(4);
    for (const action of ['import.uploaded', 'import.committed', 'demo.loaded']) {
      const { items } = await trail({ action });
      const demo = items.filter((e) => e.action === 'demo.loaded' || demoImports.has(e.target));
      expect(demo.length).toBeGreaterThan(0);
      expect(demo.map((e) => e.actorEmail)).toEqual(demo.map(() => null));
    }
  });

  it('names each target: an import by its file, an account by its e-mail', async () => {
    await signIn(DEMO_USERS.advisor);
    const imports = await trail({ action: 'import.committed' });
    expect(imports.items.map((e) => e.targetLabel)).toContain('records.csv');
    const signIns = await trail({ action: 'auth.sign_in', actor: 'advisor@' });
    expect(signIns.items[0].targetLabel).toBe(DEMO_USERS.advisor);
    expect(signIns.items[0].target).toMatch(/^[0-9a-f-]{36}$/);
  });

  it('filters by target, by its name or its id', async () => {
    const byName = await trail({ target: 'RECORDS.csv' });
    expect(byName.total).toBeGreaterThan(0);
    expect(byName.items.every((e) => e.targetLabel === 'records.csv')).toBe(true);
    const id = byName.items[0].target as string;
    const byId = await trail({ target: id });
    expect(byId.items.every((e) => e.target === id)).toBe(true);
    expect((await trail({ target: 'no-such-target-anywhere' })).total).toBe(0);
  });

  it('has words for every action the trail holds', async () => {
    const res = await api()
      .get('/api/audit')
      .set(...bearer(admin));
    // Other tests write `test.*` probes straight into the table; the product never does.
    const missing = (res.body.actions as string[]).filter(
      (a) => !AUDIT_ACTION_LABELS[a] && !a.startsWith('test.'),
    );
    expect(missing).toEqual([]);
  });
});
