import type { ModelSettingsResponse, ModelSettingsVersion } from '@kinpath/contracts';
import { DEFAULT_MODEL_SETTINGS, MEAN_CENTRED_MODEL_SETTINGS } from '@kinpath/contracts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, withDatabase } from '../support/api';
import { activeDemoStudents, lookUp } from '../support/advising';

let registrar: string;
let advisor: string;
let start: ModelSettingsResponse;

const read = async (token: string) =>
  (
    await api()
      .get('/api/model/settings')
      .set(...bearer(token))
  ).body as ModelSettingsResponse;

const put = (token: string, body: Record<string, unknown>) =>
  api()
    .put('/api/model/settings')
    .set(...bearer(token))
    .send(body);

beforeAll(async () => {
  registrar = await signIn(DEMO_USERS.registrar);
  advisor = await signIn(DEMO_USERS.advisor);
  start = await read(registrar);
});

afterAll(async () => {
  // Leave the settings as they were for the files that follow.
  if ((await read(registrar)).version !== start.version) {
    await api()
      .post(`/api/model/settings/versions/${start.version}/restore`)
      .set(...bearer(registrar));
  }
});

describe('model settings', () => {
  it('are readable by every signed-in role, with their version', async () => {
    for (const email of Object.values(DEMO_USERS)) {
      const body = await read(await signIn(email));
      expect(body.version).toBe(start.version);
      expect(Object.keys(body.settings).sort()).toEqual([
        'alpha',
        'centring',
        'gradeDampingCourse',
        'gradeDampingStudent',
        'gradeSimilarity',
        'iuf',
        'k',
        'minNeighbours',
        'minSimilarity',
        'satisfactionDampingCourse',
        'satisfactionDampingStudent',
        'satisfactionSimilarity',
        'shrinkage',
        'significance',
        'similarity',
        'tieDigits',
      ]);
    }
    expect((await api().get('/api/model/settings')).status).toBe(401);
  });

  it('start from the original method as version 1, then the new defaults as version 2', async () => {
    const versions = await api()
      .get('/api/model/settings/versions')
      .set(...bearer(registrar));
    expect(versions.status).toBe(200);
    const list = versions.body as ModelSettingsVersion[];
    // Version 1 keeps its meaning: the original method's values written out.
    expect(list.at(-1)).toMatchObject({
      version: 1,
      createdBy: null,
      settings: MEAN_CENTRED_MODEL_SETTINGS,
    });
    expect(list.at(-2)).toMatchObject({
      version: 2,
      createdBy: null,
      settings: DEFAULT_MODEL_SETTINGS,
      note: 'The baseline-centred estimator of the method description.',
    });
  });

  it('refuses settings out of range with a clear message for each', async () => {
    const res = await put(registrar, {
      similarity: 'jaccard',
      iuf: 'yes',
      centring: 'median',
      gradeSimilarity: 'height',
      gradeDampingStudent: -1,
      shrinkage: 1001,
      tieDigits: 1.5,
      k: 501,
      minNeighbours: 0,
      minSimilarity: -2,
      significance: 1001,
      alpha: 1.5,
    });
    expect(res.status).toBe(400);
    expect(res.body.message).toEqual(
      expect.arrayContaining([
        'similarity must be cosine or pearson.',
        'iuf must be true or false.',
        'centring must be one of baseline, studentMean, none.',
        'gradeSimilarity must be one of grade, satisfaction, both, enrolment, satisfaction+enrolment.',
        'gradeDampingStudent must be from 0 to 1000.',
        'shrinkage must be from 0 (off) to 1000.',
        'tieDigits must be a whole number.',
        'k must be at most 500.',
        'minNeighbours must be at least 1.',
        'minSimilarity must be between -1 and 1.',
        'significance must be at most 1000.',
        'alpha must be between 0 and 1.',
      ]),
    );
    const tooMany = await put(registrar, { ...start.settings, k: 4, minNeighbours: 5 });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.message).toEqual(['minNeighbours cannot be larger than k.']);
    const missing = await put(registrar, { similarity: 'cosine' });
    expect(missing.status).toBe(400);
    const k0 = await put(registrar, { ...start.settings, k: 0 });
    expect(k0.body.message).toContain('k must be at least 1.');
    expect((await read(registrar)).version).toBe(start.version);
  });

  it('may only be changed, listed and restored by registrar staff', async () => {
    for (const email of [DEMO_USERS.advisor, DEMO_USERS.admin, DEMO_USERS.department_head]) {
      const token = await signIn(email);
      expect((await put(token, { ...start.settings, k: 31 })).status).toBe(403);
      expect(
        (
          await api()
            .get('/api/model/settings/versions')
            .set(...bearer(token))
        ).status,
      ).toBe(403);
      expect(
        (
          await api()
            .post(`/api/model/settings/versions/${start.version}/restore`)
            .set(...bearer(token))
        ).status,
      ).toBe(403);
    }
  });

  it('become a new version on each change, named in the electives and the audit trail', async () => {
    const changed = await put(registrar, {
      ...start.settings,
      similarity: 'pearson',
      centring: 'studentMean',
      k: 40,
      significance: 10,
      note: 'Pearson for comparison',
    });
    expect(changed.status, changed.text).toBe(200);
    const next = changed.body as ModelSettingsVersion;
    expect(next).toMatchObject({
      version: start.version + 1,
      createdBy: DEMO_USERS.registrar,
      note: 'Pearson for comparison',
      restoredFrom: null,
      settings: {
        ...start.settings,
        similarity: 'pearson',
        centring: 'studentMean',
        k: 40,
        significance: 10,
      },
    });
    expect(await read(advisor)).toEqual(next);

    // The same settings again are no change.
    const again = await put(registrar, { ...next.settings });
    expect(again.body.version).toBe(next.version);

    const [studentId] = activeDemoStudents(1);
    const ref = await lookUp(advisor, studentId);
    const electives = await api()
      .get(`/api/students/${ref}/electives`)
      .set(...bearer(advisor));
    expect(electives.body.settingsVersion).toBe(next.version);

    const audit = await withDatabase(async (db) => {
      const { rows } = await db.query<{ actor_email: string; detail: Record<string, unknown> }>(
        `SELECT actor_email, detail FROM audit_events
         WHERE action = 'model.settings_changed' AND target = $1`,
        [`model_settings:${next.version}`],
      );
      return rows;
    });
    expect(audit).toHaveLength(1);
    expect(audit[0].actor_email).toBe(DEMO_USERS.registrar);
    expect(audit[0].detail).toMatchObject({
      version: next.version,
      previousVersion: start.version,
      settings: next.settings,
    });
  });

  it('restore an earlier version as a new one', async () => {
    const current = await read(registrar);
    const res = await api()
      .post(`/api/model/settings/versions/${start.version}/restore`)
      .set(...bearer(registrar));
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({
      version: current.version + 1,
      restoredFrom: start.version,
      settings: start.settings,
      createdBy: DEMO_USERS.registrar,
    });
    const versions = (
      await api()
        .get('/api/model/settings/versions')
        .set(...bearer(registrar))
    ).body as ModelSettingsVersion[];
    expect(versions.map((v) => v.version).slice(0, 3)).toEqual([
      current.version + 1,
      current.version,
      current.version - 1,
    ]);
    const missing = await api()
      .post('/api/model/settings/versions/99999/restore')
      .set(...bearer(registrar));
    expect(missing.status).toBe(404);
  });
});
