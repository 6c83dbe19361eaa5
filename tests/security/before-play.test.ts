// The entry points added for before play (issue 12): the comprehension check, the practice page
// and the Conductor's JSON of who has not passed. Each refuses what its guard should refuse.
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { comprehensionAttempts, sessionParticipants } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { createDesign, openSession } from '#tests/helpers/live';

afterAll(closeTestDb);

describe('before-play entry points', () => {
  let courseId: number;
  let sessionId: number;
  let code: string;
  let participant: Client;
  let participantId: number;
  let researcher: Client;
  let stranger: Client;
  let otherInstructor: Client;

  beforeAll(async () => {
    const e = {
      inst: uniqueEmail('bps-inst'),
      part: uniqueEmail('bps-part'),
      res: uniqueEmail('bps-res'),
      str: uniqueEmail('bps-str'),
      oth: uniqueEmail('bps-oth'),
    };
    const instructorId = await createUser(e.inst);
    participantId = await createUser(e.part, 'Named Person');
    const researcherId = await createUser(e.res);
    await createUser(e.str);
    const otherId = await createUser(e.oth);
    courseId = await createCourse('Guarded', [
      { userId: instructorId, role: 'instructor' },
      { userId: participantId, role: 'participant' },
      { userId: researcherId, role: 'researcher' },
    ]);
    await createCourse('Other', [{ userId: otherId, role: 'instructor' }]);
    const instructor = await signIn(e.inst);
    [participant, researcher, stranger, otherInstructor] = await Promise.all([signIn(e.part), signIn(e.res), signIn(e.str), signIn(e.oth)]);
    ({ sessionId, code } = await openSession(
      instructor,
      courseId,
      await createDesign(courseId, instructorId, { comprehension: true, practice: true }),
    ));
  });

  it('the practice page does not let a phone skip the check into the lobby', async () => {
    const res = await participant.post(`/join/${code}/practice`, {});
    expect(res.status).toBe(302);
    expect(res.headers.get('location')).toBe(`/join/${code}`);
    const rows = await testDb().select().from(sessionParticipants).where(eq(sessionParticipants.sessionId, sessionId));
    expect(rows).toEqual([]);
  });

  it('the instructions page sends a phone to the check, not into the lobby', async () => {
    const res = await participant.post(`/join/${code}`, {});
    expect(res.status).toBe(302);
    expect(res.headers.get('location')).toBe(`/join/${code}/check`);
  });

  it('a roster session’s check admits no outsider, and records nothing for them', async () => {
    const res = await stranger.post(`/join/${code}/check`, { 'points-dc': '50', 'points-cd': '12', draw: 'delta' });
    expect(res.status).toBe(302);
    expect(res.headers.get('location')).toBe(`/join/${code}`);
    const rows = await testDb().select().from(comprehensionAttempts).where(eq(comprehensionAttempts.sessionId, sessionId));
    expect(rows.filter((r) => r.userId !== participantId)).toEqual([]);
  });

  it('answers of any size are cut, counted, and never join', async () => {
    const res = await participant.post(`/join/${code}/check`, { 'points-dc': 'x'.repeat(5000), draw: '<script>' });
    expect(res.status).toBe(400);
    const [row] = await testDb()
      .select()
      .from(comprehensionAttempts)
      .where(and(eq(comprehensionAttempts.sessionId, sessionId), eq(comprehensionAttempts.userId, participantId)));
    expect(row.attempts).toBeGreaterThanOrEqual(1);
    expect(row.passedAt).toBeNull();
  });

  it('who has not passed (with names) is for the course’s instructors and assistants only', async () => {
    const url = `/courses/${courseId}/sessions/${sessionId}/comprehension`;
    for (const c of [participant, researcher, otherInstructor]) {
      const res = await c.get(url);
      expect([403, 404]).toContain(res.status);
      expect(await res.text()).not.toContain('Named Person');
    }
    expect((await stranger.get(url)).status).not.toBe(200);
  });
});
