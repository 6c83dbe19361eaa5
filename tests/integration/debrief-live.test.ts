// The Debrief, a participant's own summary, the chart downloads and an estimation on a session
// that is not cleanly finished: running with a round only one phone of a pair has chosen in,
// paused, and ended by "End now" in the middle of that round. None of them may answer 500; the
// half-finished round is left out of the numbers and said to be.
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { ParticipantView } from '#realtime/engine/types';
import { closeTestDb, createCourse, createUser } from '#tests/helpers/db';
import { waitEstimate } from '#tests/helpers/estimates';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, join, nextView, openSession, type TestSocket } from '#tests/helpers/live';

afterEach(closeSockets);
afterAll(closeTestDb);

describe('a Debrief while the session runs, is paused, and after “End now” mid-round', () => {
  let courseId: number;
  let instructor: Client;
  let instructorId: number;
  const people: { client: Client; socket?: TestSocket; view?: ParticipantView }[] = [];

  beforeAll(async () => {
    const instEmail = uniqueEmail('dl-inst');
    instructorId = await createUser(instEmail);
    const ids: number[] = [];
    for (let i = 0; i < 4; i++) {
      const email = uniqueEmail(`dl-p${i}`);
      ids.push(await createUser(email));
      people.push({ client: await signIn(email) });
    }
    courseId = await createCourse('Debrief of a live session', [
      { userId: instructorId, role: 'instructor' },
      ...ids.map((userId) => ({ userId, role: 'participant' as const })),
    ]);
    instructor = await signIn(instEmail);
  });

  it('answers 200 at every stage, and counts only complete rounds', async () => {
    // a long round timer: no choice is filled by the timeout rule while the test runs
    const designId = await createDesign(courseId, instructorId, { supergames: 3, delta: 0.9, roundSeconds: 600 });
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    for (const p of people) {
      await join(p.client, code);
      p.socket = await connect(p.client.cookieHeader());
      expect((await p.socket.emitWithAck('session:watch', { sessionId, as: 'participant' })).ok).toBe(true);
    }
    const staff = await connect(instructor.cookieHeader());
    const firstViews = people.map((p) => nextView(p.socket!, (v) => v.status === 'choosing' && v.round === 1));
    expect(await staff.emitWithAck('session:control', { sessionId, command: 'start' })).toEqual({ ok: true, data: { status: 'running' } });
    const views = await Promise.all(firstViews);
    views.forEach((v, i) => (people[i].view = v));

    // Pair A: only one phone chooses (a half-finished round). Pair B: both choose (a complete round).
    const [a0] = people;
    const partnerOfA0 = people.find((p) => p !== a0 && p.view!.pairId === a0.view!.pairId)!;
    const pairB = people.filter((p) => p !== a0 && p !== partnerOfA0);
    expect(pairB).toHaveLength(2);
    const submit = (p: (typeof people)[number], action: 'C' | 'D', id: string) =>
      p.socket!.emitWithAck('choice:submit', { sessionId, supergame: 1, round: 1, action, clientChoiceId: `dl-${id}-${sessionId}-round1` });
    expect((await submit(a0, 'C', 'a0')).ok).toBe(true);
    const resolved = nextView(pairB[0].socket!, (v) => v.history.length >= 1);
    expect((await submit(pairB[0], 'C', 'b0')).ok).toBe(true);
    expect((await submit(pairB[1], 'D', 'b1')).ok).toBe(true);
    await resolved;

    const debrief = `/courses/${courseId}/debrief/${sessionId}`;
    const check = async (stage: string) => {
      const res = await instructor.get(debrief);
      const html = await res.text();
      expect([stage, res.status]).toEqual([stage, 200]);
      const text = pageText(html);
      // the complete round's two choices count; the half-finished round is named, not counted
      expect(text).toContain('1 half-finished round');
      const csv = await instructor.get(`/courses/${courseId}/debrief/csv/cooperation-by-supergame?sessions=${sessionId}`);
      expect([stage, csv.status]).toEqual([stage, 200]);
      const lines = (await csv.text()).trimEnd().split('\n');
      expect(lines[1]).toMatch(new RegExp(`^${sessionId},.*,1,\\d+,2,0\\.5,`));
      const mine = await a0.client.get(`/courses/${courseId}/debrief/${sessionId}/mine`);
      expect([stage, mine.status]).toEqual([stage, 200]);
      const theirs = await pairB[0].client.get(`/courses/${courseId}/debrief/${sessionId}/mine`);
      expect([stage, theirs.status]).toEqual([stage, 200]);
      expect(await theirs.text()).toContain('data-testid="total-points">12<');
    };

    await check('running');
    expect(await staff.emitWithAck('session:control', { sessionId, command: 'pause' })).toEqual({ ok: true, data: { status: 'paused' } });
    await check('paused');
    expect(await staff.emitWithAck('session:control', { sessionId, command: 'resume' })).toEqual({ ok: true, data: { status: 'running' } });
    expect(await staff.emitWithAck('session:control', { sessionId, command: 'end-now' })).toMatchObject({ ok: true });
    await check('ended mid-round');

    // An estimation on the ended session runs to the end on the complete round's choices.
    const res = await instructor.post(`/courses/${courseId}/estimates`, {
      sessions: String(sessionId),
      windowKind: 'all',
      preset: 'dbf2011',
      bootstrap: 0,
      seed: 3,
    });
    expect(res.status).toBe(202);
    const { estimate } = (await res.json()) as { estimate: { id: number } };
    const done = await waitEstimate(instructor, courseId, estimate.id);
    expect([done.status, done.error]).toEqual(['done', null]);
    expect(done.result!.groups.map((g) => [g.subjects, g.choices])).toEqual([[2, 2]]);
  });
});
