import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { bearer, DEMO_USERS, signIn, testUrl } from '../support/api';

describe('the demo data of the shared test server', () => {
  it('was loaded through the import path: four committed imports by the system, not a person', async () => {
    const token = await signIn(DEMO_USERS.registrar);
    const res = await request(testUrl())
      .get('/api/imports')
      .set(...bearer(token));
    expect(res.status).toBe(200);
    const demo = res.body.filter((i: { fileName: string }) =>
      ['catalogue.csv', 'offerings.csv', 'students.csv', 'records.csv'].includes(i.fileName),
    );
    expect(demo.slice(-4).map((i: { kind: string }) => i.kind)).toEqual([
      'records',
      'students',
      'offerings',
      'catalogue',
    ]);
    for (const i of demo.slice(-4)) {
      expect(i).toMatchObject({
        status: 'committed',
        rowsRejected: 0,
        createdBy: null,
      });
      expect(i.rowsAccepted).toBeGreaterThan(0);
    }
    const terms = await request(testUrl())
      .get('/api/terms')
      .set(...bearer(token));
    expect(terms.body.current).toMatch(/^\d{4}-(WI|SP|SU|FA)$/);
    expect(terms.body.next).toMatch(/^\d{4}-(WI|SP|SU|FA)$/);
  });
});
