import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { courseMembers, courses, invitations, users } from '#drizzle/schema';
import { closeTestDb, createCourse, createCourseCreator, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { waitForMail } from '#tests/helpers/mail';

afterAll(closeTestDb);

async function memberRows(courseId: number) {
  return testDb()
    .select({ userId: courseMembers.userId, role: courseMembers.role })
    .from(courseMembers)
    .where(eq(courseMembers.courseId, courseId));
}

describe('courses', () => {
  it('a user allowed to create courses creates one and becomes its instructor', async () => {
    const email = uniqueEmail('creator');
    await createCourseCreator(email);
    const c = await signIn(email);
    const res = await c.post('/courses/new', { title: 'Game Theory 301', institution: 'Test College', term: 'Fall' });
    expect(res.status).toBe(302);
    const id = Number(res.headers.get('location')!.split('/').pop());
    const [u] = await testDb().select().from(users).where(eq(users.email, email));
    expect(await memberRows(id)).toEqual([{ userId: u.id, role: 'instructor' }]);
    const page = await c.get(`/courses/${id}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Game Theory 301');
  });

  it('a course without a title returns a field error and saves nothing', async () => {
    const email = uniqueEmail('notitle');
    await createCourseCreator(email);
    const c = await signIn(email);
    const before = (await testDb().select({ id: courses.id }).from(courses)).length;
    const res = await c.post('/courses/new', { title: ' x ', term: 'Fall' });
    expect(res.status).toBe(400);
    const html = await res.text();
    expect(html).toContain('Give the course a title of at least 3 characters.');
    expect(html).toContain('value="Fall"');
    expect((await testDb().select({ id: courses.id }).from(courses)).length).toBe(before);
  });
});

describe('roles guard every course page and action', () => {
  let courseId: number;
  const emails = {
    instructor: uniqueEmail('inst'),
    assistant: uniqueEmail('asst'),
    researcher: uniqueEmail('res'),
    participant: uniqueEmail('part'),
    outsider: uniqueEmail('out'),
  };
  const clients = {} as Record<keyof typeof emails, Client>;
  const ids = {} as Record<keyof typeof emails, number>;

  beforeAll(async () => {
    for (const k of Object.keys(emails) as (keyof typeof emails)[]) ids[k] = await createUser(emails[k]);
    courseId = await createCourse('Guarded course', [
      { userId: ids.instructor, role: 'instructor' },
      { userId: ids.assistant, role: 'assistant' },
      { userId: ids.researcher, role: 'researcher' },
      { userId: ids.participant, role: 'participant' },
    ]);
    for (const k of Object.keys(emails) as (keyof typeof emails)[]) clients[k] = await signIn(emails[k]);
  });

  it('course page: staff 200, participant and outsider 403, unknown id 404', async () => {
    for (const k of ['instructor', 'assistant', 'researcher'] as const)
      expect((await clients[k].get(`/courses/${courseId}`)).status).toBe(200);
    const part = await clients.participant.get(`/courses/${courseId}`);
    expect(part.status).toBe(403);
    expect(await part.text()).toContain('Not for your role');
    expect((await clients.outsider.get(`/courses/${courseId}`)).status).toBe(403);
    expect((await clients.instructor.get('/courses/99999999')).status).toBe(404);
    expect((await clients.instructor.get('/courses/abc')).status).toBe(404);
  });

  it('members page: instructor and assistant see it; researcher (de-identified only) does not', async () => {
    expect((await clients.instructor.get(`/courses/${courseId}/members`)).status).toBe(200);
    const asst = await clients.assistant.get(`/courses/${courseId}/members`);
    expect(asst.status).toBe(200);
    expect(await asst.text()).toContain(emails.participant);
    expect((await clients.researcher.get(`/courses/${courseId}/members`)).status).toBe(403);
    expect((await clients.participant.get(`/courses/${courseId}/members`)).status).toBe(403);
  });

  it('only the instructor changes members; others get 403 and nothing changes', async () => {
    const before = await memberRows(courseId);
    const [participantRow] = await testDb()
      .select({ id: courseMembers.id })
      .from(courseMembers)
      .where(and(eq(courseMembers.courseId, courseId), eq(courseMembers.userId, ids.participant)));
    for (const k of ['assistant', 'researcher', 'participant', 'outsider'] as const) {
      const res = await clients[k].post(`/courses/${courseId}/members`, {
        intent: 'change-role',
        memberId: participantRow.id,
        role: 'instructor',
      });
      expect(res.status).toBe(403);
      const inv = await clients[k].post(`/courses/${courseId}/members`, { intent: 'invite', email: uniqueEmail('x'), role: 'assistant' });
      expect(inv.status).toBe(403);
    }
    expect(await memberRows(courseId)).toEqual(before);
  });

  it('invalid member actions return field errors and change nothing', async () => {
    const before = await memberRows(courseId);
    const bad = await clients.instructor.post(`/courses/${courseId}/members`, { intent: 'invite', email: 'nope', role: 'assistant' });
    expect(bad.status).toBe(400);
    expect(await bad.text()).toContain('Enter an e-mail address such as name@university.edu.');
    const badRole = await clients.instructor.post(`/courses/${courseId}/members`, {
      intent: 'invite',
      email: uniqueEmail('r'),
      role: 'dean',
    });
    expect(badRole.status).toBe(400);
    const already = await clients.instructor.post(`/courses/${courseId}/members`, {
      intent: 'invite',
      email: emails.assistant,
      role: 'assistant',
    });
    expect(already.status).toBe(400);
    expect(await already.text()).toContain('is already a member');
    const unknownIntent = await clients.instructor.post(`/courses/${courseId}/members`, { intent: 'drop-table' });
    expect(unknownIntent.status).toBe(400);
    expect(await memberRows(courseId)).toEqual(before);
  });

  it('the last instructor can neither be removed nor demoted', async () => {
    const [me] = await testDb()
      .select({ id: courseMembers.id })
      .from(courseMembers)
      .where(and(eq(courseMembers.courseId, courseId), eq(courseMembers.userId, ids.instructor)));
    const res = await clients.instructor.post(`/courses/${courseId}/members`, { intent: 'remove', memberId: me.id });
    expect(res.status).toBe(400);
    expect(await res.text()).toContain('A course needs at least one instructor.');
    const demote = await clients.instructor.post(`/courses/${courseId}/members`, {
      intent: 'change-role',
      memberId: me.id,
      role: 'assistant',
    });
    expect(demote.status).toBe(400);
    expect((await memberRows(courseId)).find((m) => m.userId === ids.instructor)?.role).toBe('instructor');
  });

  it('role change and removal by the instructor', async () => {
    const [row] = await testDb()
      .select({ id: courseMembers.id })
      .from(courseMembers)
      .where(and(eq(courseMembers.courseId, courseId), eq(courseMembers.userId, ids.researcher)));
    expect(
      (await clients.instructor.post(`/courses/${courseId}/members`, { intent: 'change-role', memberId: row.id, role: 'assistant' }))
        .status,
    ).toBe(200);
    expect((await memberRows(courseId)).find((m) => m.userId === ids.researcher)?.role).toBe('assistant');
    expect((await clients.instructor.post(`/courses/${courseId}/members`, { intent: 'remove', memberId: row.id })).status).toBe(200);
    expect((await memberRows(courseId)).some((m) => m.userId === ids.researcher)).toBe(false);
    expect((await clients.researcher.get(`/courses/${courseId}`)).status).toBe(403);
  });
});

describe('invitations', () => {
  it('an invited assistant receives the e-mail, accepts, and gets assistant rights', async () => {
    const host = uniqueEmail('host');
    await createCourseCreator(host);
    const inst = await signIn(host);
    const made = await inst.post('/courses/new', { title: 'Invitation course' });
    const courseId = Number(made.headers.get('location')!.split('/').pop());
    const invitee = uniqueEmail('invitee');
    expect((await inst.post(`/courses/${courseId}/members`, { intent: 'invite', email: invitee, role: 'assistant' })).status).toBe(200);
    const mail = await waitForMail(invitee, { subject: /Invitation to Invitation course/ });
    expect(mail.text).toContain('as an assistant');
    const link = /(http\S+\/invitations\/\S+)/.exec(mail.text)![1];
    const path = new URL(link).pathname;
    const [stored] = await testDb().select().from(invitations).where(eq(invitations.email, invitee));
    expect(stored.tokenHash).not.toContain(path.split('/').pop()!);

    // Someone else opening the link cannot take the invitation.
    const other = await signIn(uniqueEmail('thief'));
    expect(await (await other.get(path)).text()).toContain('This invitation was sent to');
    expect((await other.post(path, {})).status).toBe(400);

    const guest = await signIn(invitee);
    const page = await guest.get(path);
    expect(await page.text()).toContain('Accept and join');
    const accepted = await guest.post(path, {});
    expect(accepted.status).toBe(302);
    expect(accepted.headers.get('location')).toBe(`/courses/${courseId}`);
    expect((await guest.get(`/courses/${courseId}/members`)).status).toBe(200);
    expect(
      (await guest.post(`/courses/${courseId}/members`, { intent: 'invite', email: uniqueEmail('y'), role: 'assistant' })).status,
    ).toBe(403);
    // A second use of the link changes nothing.
    expect((await guest.post(path, {})).status).toBe(400);
  });

  it('an unknown invitation token is a 404', async () => {
    const c = await signIn(uniqueEmail('lost'));
    expect((await c.get('/invitations/not-a-token')).status).toBe(404);
  });
});

describe('site admin', () => {
  it('admins open the admin page and every course; others get 403', async () => {
    const admin = await signIn('admin@halvorsen.example');
    expect((await admin.get('/admin')).status).toBe(200);
    const [demo] = await testDb().select({ id: courses.id }).from(courses).where(eq(courses.isDemo, true));
    expect((await admin.get(`/courses/${demo.id}/members`)).status).toBe(200);
    const someone = await signIn(uniqueEmail('plain'));
    expect((await someone.get('/admin')).status).toBe(403);
  });
});
