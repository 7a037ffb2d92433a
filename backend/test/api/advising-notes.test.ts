import { beforeAll, describe, expect, it } from 'vitest';
import { api, bearer, DEMO_USERS, signIn, uniqueEmail } from '../support/api';
import { activeDemoStudents, lookUp, waitForModel } from '../support/advising';

let advisor: string;
let other: string;
let ref: string;
let studentId: string;

beforeAll(async () => {
  advisor = await signIn(DEMO_USERS.advisor);
  const admin = await signIn(DEMO_USERS.admin);
  const email = uniqueEmail('advisor.notes');
  await api()
    .post('/api/users')
    .set(...bearer(admin))
    .send({
      email,
      displayName: 'Other advisor',
      role: 'advisor',
      password: 'other-advisor-2026-x',
    })
    .expect(201);
  other = await signIn(email, 'other-advisor-2026-x');
  [studentId] = activeDemoStudents(1);
  ref = await lookUp(advisor, studentId);
}, 60_000);

const notes = async (token = advisor) =>
  (
    await api()
      .get(`/api/students/${ref}/notes`)
      .set(...bearer(token))
  ).body as { id: string; text: string; editedAt: string | null }[];

async function audit(action: string) {
  const admin = await signIn(DEMO_USERS.admin);
  const res = await api()
    .get('/api/audit')
    .query({ action, target: ref })
    .set(...bearer(admin));
  return res.body.items as { actorEmail: string; detail: Record<string, unknown> }[];
}

describe('notes: their author may edit and delete them', () => {
  it('edits a note, marks when, and records that it changed (not the words)', async () => {
    const posted = await api()
      .post(`/api/students/${ref}/notes`)
      .set(...bearer(advisor))
      .send({ text: 'First thoughts.' })
      .expect(201);
    const id = posted.body.id as string;
    const edited = await api()
      .patch(`/api/students/${ref}/notes/${id}`)
      .set(...bearer(advisor))
      .send({ text: '  Second thoughts.  ' });
    expect(edited.status, edited.text).toBe(200);
    expect(edited.body).toMatchObject({ id, text: 'Second thoughts.' });
    expect(edited.body.editedAt).toEqual(expect.any(String));
    expect((await notes()).find((n) => n.id === id)?.text).toBe('Second thoughts.');
    const trail = await audit('student.note_edited');
    expect(trail[0]).toMatchObject({ actorEmail: DEMO_USERS.advisor, detail: { noteId: id } });
    expect(JSON.stringify(trail[0])).not.toContain('Second thoughts');
  });

  it('refuses another advisor, and an empty text', async () => {
    const { body } = await api()
      .post(`/api/students/${ref}/notes`)
      .set(...bearer(advisor))
      .send({ text: 'Mine alone.' });
    const patch = await api()
      .patch(`/api/students/${ref}/notes/${body.id}`)
      .set(...bearer(other))
      .send({ text: 'Not yours.' });
    expect(patch.status).toBe(403);
    expect(patch.body.message).toBe('Only the advisor who wrote a note may change or delete it.');
    await api()
      .delete(`/api/students/${ref}/notes/${body.id}`)
      .set(...bearer(other))
      .expect(403);
    await api()
      .patch(`/api/students/${ref}/notes/${body.id}`)
      .set(...bearer(advisor))
      .send({ text: '   ' })
      .expect(400);
    expect((await notes()).find((n) => n.id === body.id)?.text).toBe('Mine alone.');
  });

  it('deletes a note, audited, and answers 404 after', async () => {
    const { body } = await api()
      .post(`/api/students/${ref}/notes`)
      .set(...bearer(advisor))
      .send({ text: 'Soon gone.' });
    await api()
      .delete(`/api/students/${ref}/notes/${body.id}`)
      .set(...bearer(advisor))
      .expect(204);
    expect((await notes()).some((n) => n.id === body.id)).toBe(false);
    await api()
      .delete(`/api/students/${ref}/notes/${body.id}`)
      .set(...bearer(advisor))
      .expect(404);
    expect((await audit('student.note_deleted'))[0]).toMatchObject({
      detail: { noteId: body.id },
    });
  });
});

describe('sent summaries on the student page', () => {
  it('lists each summary: when, to whom, which courses, and never the student number', async () => {
    await waitForModel();
    const electives = await api()
      .get(`/api/students/${ref}/electives`)
      .set(...bearer(advisor));
    const codes = (electives.body.electives as { courseCode: string; eligible: boolean }[])
      .filter((e) => e.eligible)
      .slice(0, 2)
      .map((e) => e.courseCode);
    const to = uniqueEmail('student.summary');
    await api()
      .post(`/api/students/${ref}/summary`)
      .set(...bearer(advisor))
      .send({ to, courseCodes: codes, message: 'As discussed.' })
      .expect(200);
    const list = await api()
      .get(`/api/students/${ref}/summaries`)
      .set(...bearer(advisor));
    expect(list.status).toBe(200);
    expect(list.body[0]).toMatchObject({
      to,
      term: electives.body.term,
      courseCodes: codes,
      senderName: expect.any(String),
      sentAt: expect.any(String),
    });
    expect(JSON.stringify(list.body)).not.toContain(studentId);
    await api()
      .get(`/api/students/${ref}/summaries`)
      .set(...bearer(await signIn(DEMO_USERS.registrar)))
      .expect(403);
  });
});
