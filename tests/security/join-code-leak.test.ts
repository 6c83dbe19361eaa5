// Issue 9 #4: /play/:id redirected anyone signed in to /join/<code>, and session ids are
// sequential, so walking the ids harvested every open session's join code.
import { isNotNull, max } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessions } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { createDesign, join, openSession } from '#tests/helpers/live';

afterAll(closeTestDb);

describe('join codes do not leak through /play/:id', () => {
  let sessionId: number;
  let code: string;
  let instructor: Client;
  let participant: Client;

  beforeAll(async () => {
    const instEmail = uniqueEmail('leak-inst');
    const partEmail = uniqueEmail('leak-part');
    const instructorId = await createUser(instEmail);
    const participantId = await createUser(partEmail);
    const courseId = await createCourse('Leak course', [
      { userId: instructorId, role: 'instructor' },
      { userId: participantId, role: 'participant' },
    ]);
    instructor = await signIn(instEmail);
    participant = await signIn(partEmail);
    ({ sessionId, code } = await openSession(instructor, courseId, await createDesign(courseId, instructorId)));
  });

  it('a signed-in stranger walking every session id gets 404 and never sees a join code', async () => {
    const stranger = await signIn(uniqueEmail('leak-walker'));
    const [{ top }] = await testDb()
      .select({ top: max(sessions.id) })
      .from(sessions);
    const codes = (await testDb().select({ code: sessions.joinCode }).from(sessions).where(isNotNull(sessions.joinCode))).map(
      (r) => r.code!,
    );
    expect(codes).toContain(code);
    expect(top).toBeGreaterThanOrEqual(sessionId);
    for (let id = 1; id <= top! + 1; id++) {
      const res = await stranger.get(`/play/${id}`);
      const location = res.headers.get('location') ?? '';
      const body = await res.text();
      expect(res.status, `/play/${id}`).toBe(404);
      expect(location, `/play/${id}`).toBe('');
      for (const c of codes) {
        expect(body.includes(c), `/play/${id} shows a join code`).toBe(false);
      }
    }
  });

  it('staff of the course still get to the join page; a participant who joined plays', async () => {
    const staff = await instructor.get(`/play/${sessionId}`);
    expect(staff.status).toBe(302);
    expect(staff.headers.get('location')).toBe(`/join/${code}`);
    expect(await join(participant, code)).toBe(`/play/${sessionId}`);
    expect((await participant.get(`/play/${sessionId}`)).status).toBe(200);
  });
});
