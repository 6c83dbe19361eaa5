// The class hour as an instructor runs it (issue 12): what the staff can still do to a finished
// session, what the seed field accepts, and a mistyped join code caught before any sign-in.
import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb } from '#tests/helpers/db';
import { Client, pageText } from '#tests/helpers/http';
import { closeSockets, connect, courseOf, join, openSession } from '#tests/helpers/live';

afterAll(async () => {
  closeSockets();
  await closeTestDb();
});

const classOf = (n: number) => courseOf(n, { tag: 'chi', title: 'Class hour' });

describe('the class hour, staff side', () => {
  it('refuses to nudge a participant of a completed session', async () => {
    const { courseId, designId, instructor, players, playerIds } = await classOf(2);
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    for (const p of players) await join(p, code);
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'start' })).ok).toBe(true);
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'end-now' })).ok).toBe(true);

    const nudge = await staff
      .timeout(8000)
      .emitWithAck('participant:act', { sessionId, participantId: String(playerIds[0]), action: 'nudge' });
    // Before the fix: { ok: true, data: { done: true } } on a completed session.
    expect(nudge).toMatchObject({ ok: false, code: 'session-not-running' });
    const hand = await staff
      .timeout(8000)
      .emitWithAck('participant:act', { sessionId, participantId: String(playerIds[0]), action: 'hand-to-computer', strategy: 'TFT' });
    expect(hand).toMatchObject({ ok: false, code: 'session-not-running' });
  });

  it('refuses a seed that is not a whole number, with the reason beside the field', async () => {
    const { courseId, designId, instructor } = await classOf(0);
    for (const seed of ['12a45', 'my seed', '4294967296', '-3']) {
      const res = await instructor.post(`/courses/${courseId}/sessions`, { designId, admission: 'roster', seed, emailDomain: '' });
      // Before the fix: 302 to a new session whose seed was a hash of the text.
      expect(res.status).toBe(400);
      expect(pageText(await res.text())).toContain('A seed is a whole number from 0 to 4294967295');
    }
    const ok = await instructor.post(`/courses/${courseId}/sessions`, {
      designId,
      admission: 'roster',
      seed: '4294967295',
      emailDomain: '',
    });
    expect(ok.status).toBe(302);
  });

  it('answers a mistyped join code on the join page itself, before any sign-in', async () => {
    const { courseId, designId, instructor } = await classOf(0);
    const { code } = await openSession(instructor, courseId, designId);
    const stranger = new Client();
    // A code of the right shape that no session has (the first letter changed).
    const wrong = (code[0] === 'A' ? 'B' : 'A') + code.slice(1);
    const miss = await stranger.post('/join', { code: wrong.toLowerCase() });
    // Before the fix: 302 to /join/<code>, then sign-in, then "404 Nothing here".
    expect(miss.status).toBe(404);
    const text = pageText(await miss.text());
    expect(text).toContain('No session is open with this code');
    expect(text).toContain(wrong.toLowerCase());
    const hit = await stranger.post('/join', { code: code.toLowerCase() });
    expect(hit.status).toBe(302);
    expect(hit.headers.get('location')).toBe(`/join/${code}`);
  });
});
