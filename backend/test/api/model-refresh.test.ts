import { describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, testUrl } from '../support/api';
import { activeDemoStudents, lookUp, waitForModel } from '../support/advising';
import { importCommitted, RECORDS_HEADER } from '../support/imports';

async function modelBuiltAt(token: string, ref: string): Promise<string> {
  const res = await api()
    .get(`/api/students/${ref}/electives`)
    .set(...bearer(token));
  expect(res.status, res.text).toBe(200);
  return res.body.modelBuiltAt as string;
}

describe('the advising model after term data changes', () => {
  it('is rebuilt after a commit and after a rollback, and the import history says so', async () => {
    await waitForModel();
    const advisor = await signIn(DEMO_USERS.advisor);
    const registrar = await signIn(DEMO_USERS.registrar);
    const demoRef = await lookUp(advisor, activeDemoStudents(1)[0]);
    const before = await modelBuiltAt(advisor, demoRef);

    // A student the demo does not have, so no other test's figures move.
    const newcomer = `HX9${Date.now().toString().slice(-6)}`;
    const committed = await importCommitted(
      testUrl(),
      registrar,
      'records',
      `${RECORDS_HEADER}${newcomer},2025-FA,HRU 1010,B,4,3\n`,
    );
    await waitForModel();
    const refreshed = await api()
      .get(`/api/imports/${committed.id}`)
      .set(...bearer(registrar));
    expect(Date.parse(refreshed.body.modelRefreshedAt)).toBeGreaterThanOrEqual(
      Date.parse(refreshed.body.committedAt),
    );
    const afterCommit = await modelBuiltAt(advisor, demoRef);
    expect(Date.parse(afterCommit)).toBeGreaterThan(Date.parse(before));

    const ref = await lookUp(advisor, newcomer);
    const history = await api()
      .get(`/api/students/${ref}/history`)
      .set(...bearer(advisor));
    expect(history.body).toMatchObject([{ term: '2025-FA', courseCode: 'HRU 1010', grade: 'B' }]);

    const rolledBack = await api()
      .post(`/api/imports/${committed.id}/rollback`)
      .set(...bearer(registrar));
    expect(rolledBack.status, rolledBack.text).toBe(200);
    const deadline = Date.now() + 20_000;
    let afterRollback = afterCommit;
    while (afterRollback === afterCommit && Date.now() < deadline) {
      await new Promise((r) => setTimeout(r, 200));
      afterRollback = await modelBuiltAt(advisor, demoRef);
    }
    expect(Date.parse(afterRollback)).toBeGreaterThan(Date.parse(afterCommit));
  });
});
