// Two session runners in one test process stand for two cluster processes that disagree for a
// moment about who owns a session (docs/decisions/036-fencing-a-session-owner.md): the one that
// takes the session over raises its lease epoch, and the other, still holding its older copy,
// must neither store a row nor answer from that copy — a refusal such as "not this round" from
// an out-of-date copy would make a phone drop a choice it should send again.
import { and, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { createSessionFromDesign } from '#app/models/session.server';
import { choices, sessions } from '#drizzle/schema';
import type { EngineState } from '#realtime/engine/types';
import { type Ownership, SessionMoved, SessionRunner } from '#realtime/runner';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { uniqueEmail } from '#tests/helpers/http';
import { createDesign } from '#tests/helpers/live';

const runners: SessionRunner[] = [];
afterAll(async () => {
  for (const r of runners) r.close();
  await closeTestDb();
});

/** A runner that believes it owns every session (as a process with an out-of-date member list does). */
function runnerOwningAll() {
  const fenced: number[] = [];
  const r = new SessionRunner(null);
  const ownership: Ownership = {
    owns: () => true,
    dispatchAtOwner: async (sessionId, event) => ({ error: (await r.dispatch(sessionId, event)).error ?? null }),
    fenced: (sessionId) => fenced.push(sessionId),
    health: async () => ({ redis: true, adapter: true, member: 'test', members: ['test'], sessionsHeld: [] }),
  };
  r.setOwnership(ownership);
  runners.push(r);
  return { runner: r, fenced };
}

/** A session with two players, opened and started on `runner` (which holds it). */
async function runningSession(runner: SessionRunner) {
  const instructorId = await createUser(uniqueEmail('fence-inst'));
  const players = [await createUser(uniqueEmail('fence-a')), await createUser(uniqueEmail('fence-b'))];
  const courseId = await createCourse('Fencing', [
    { userId: instructorId, role: 'instructor' },
    ...players.map((userId) => ({ userId, role: 'participant' as const })),
  ]);
  const designId = await createDesign(courseId, instructorId, { supergames: 3, delta: 0.9, roundSeconds: 600 });
  const opened = await createSessionFromDesign({
    courseId,
    designId,
    userId: instructorId,
    seed: '7',
    admission: 'roster',
    emailDomain: null,
  });
  if (!opened.ok) throw new Error(opened.message);
  const sessionId = opened.sessionId;
  const ids = players.map(String);
  await runner.takeOver(sessionId);
  for (const e of [
    { type: 'open' },
    { type: 'join', participantId: ids[0] },
    { type: 'join', participantId: ids[1] },
    { type: 'start' },
  ] as const) {
    const res = await runner.dispatch(sessionId, e);
    if (res.error) throw new Error(`${e.type}: ${res.error.message}`);
  }
  return { sessionId, players: ids };
}

const roundOf = (state: EngineState, participantId: string) => {
  const pair = Object.values(state.pairs).find((p) => !p.done && p.seats.some((s) => s.participantId === participantId));
  if (!pair || !state.supergame) throw new Error(`${participantId} is not in an open pair`);
  return { supergame: state.supergame.number, round: pair.round };
};

const stored = async (sessionId: number, clientChoiceId: string) =>
  (
    await testDb()
      .select()
      .from(choices)
      .where(and(eq(choices.sessionId, sessionId), eq(choices.clientChoiceId, clientChoiceId)))
  ).length;

describe('a session taken over while another process still holds it', () => {
  it('the older copy stores nothing and answers unavailable; its process hears it was fenced off; the new owner stores the choice', async () => {
    const a = runnerOwningAll();
    const b = runnerOwningAll();
    const { sessionId, players } = await runningSession(a.runner);
    const state = (await a.runner.state(sessionId))!;
    const [epochBefore] = await testDb().select({ epoch: sessions.leaseEpoch }).from(sessions).where(eq(sessions.id, sessionId));

    // b takes the session over (its member list says it owns it now): the lease moves on.
    await b.runner.takeOver(sessionId);
    const [epochAfter] = await testDb().select({ epoch: sessions.leaseEpoch }).from(sessions).where(eq(sessions.id, sessionId));
    expect(epochAfter.epoch).toBe(epochBefore.epoch + 1);

    // a, still holding its copy, is sent a choice: refused as 'unavailable', nothing stored.
    const choice = {
      type: 'choose' as const,
      participantId: players[0],
      ...roundOf(state, players[0]),
      action: 'C' as const,
      clientChoiceId: 'fence-1',
    };
    await expect(a.runner.dispatch(sessionId, choice)).rejects.toBeInstanceOf(SessionMoved);
    expect(await stored(sessionId, 'fence-1')).toBe(0);
    expect(a.fenced).toEqual([sessionId]);
    expect(a.runner.holds(sessionId)).toBe(false);

    // The phone sends the same choice again; it reaches b, which stores it once.
    const res = await b.runner.dispatch(sessionId, choice);
    expect(res.error ?? null).toBeNull();
    expect(res.row?.clientChoiceId).toBe('fence-1');
    expect(await stored(sessionId, 'fence-1')).toBe(1);
  });

  it('an event with nothing to store is not answered from the older copy either (it would say "not this round")', async () => {
    const a = runnerOwningAll();
    const b = runnerOwningAll();
    const { sessionId, players } = await runningSession(a.runner);
    const first = roundOf((await a.runner.state(sessionId))!, players[0]);
    // b takes over and plays round 1 on: both choose, the pair moves to round 2.
    await b.runner.takeOver(sessionId);
    for (const [i, p] of players.entries()) {
      const r = await b.runner.dispatch(sessionId, {
        type: 'choose',
        participantId: p,
        ...first,
        action: 'D',
        clientChoiceId: `fence-r1-${i}`,
      });
      expect(r.error ?? null).toBeNull();
    }
    const second = roundOf((await b.runner.state(sessionId))!, players[0]);
    expect(second.round).toBe(first.round + 1);

    // a's copy still shows round 1 with no choices: there the phone's round-2 choice is refused
    // ("not this round"), and nothing is stored, so no write could notice the copy is old. The
    // phone must hear 'unavailable' (send it again), not the refusal (drop it).
    const late = { type: 'choose' as const, participantId: players[0], ...second, action: 'C' as const, clientChoiceId: 'fence-r2-0' };
    await expect(a.runner.dispatch(sessionId, late)).rejects.toBeInstanceOf(SessionMoved);
    expect(a.fenced).toEqual([sessionId]);
    // Taken back properly (a new lease, rebuilt from the database), a's copy is current again and
    // takes the choice; b's copy is the old one now.
    await a.runner.takeOver(sessionId);
    expect(roundOf((await a.runner.state(sessionId))!, players[0])).toEqual(second);
    expect((await a.runner.dispatch(sessionId, late)).row?.clientChoiceId).toBe('fence-r2-0');
    await expect(b.runner.dispatch(sessionId, { type: 'reconnect', participantId: players[1] })).rejects.toBeInstanceOf(SessionMoved);
    expect(b.fenced).toEqual([sessionId]);
  });
});
