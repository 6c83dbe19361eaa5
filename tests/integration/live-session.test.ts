import { and, eq } from 'drizzle-orm';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { choices, courseMembers, sessionLog, sessionParticipants } from '#drizzle/schema';
import type { ParticipantView } from '#realtime/engine/types';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, join, nextView, openSession, type TestSocket } from '#tests/helpers/live';

afterEach(closeSockets);
afterAll(closeTestDb);

interface Seat {
  email: string;
  /** signed in once the users exist (beforeAll) */
  client?: Client;
  socket?: TestSocket;
}

/** A seat's signed-in client (beforeAll signs every seat in). */
const clientOf = (s: Seat): Client => {
  if (!s.client) throw new Error(`${s.email} is not signed in`);
  return s.client;
};

async function storedFor(sessionId: number) {
  return testDb().select().from(choices).where(eq(choices.sessionId, sessionId));
}

describe('a live session over real sockets', () => {
  let courseId: number;
  let instructor: Client;
  let instructorId: number;
  const seats: Seat[] = [];
  let outsider: Client;

  beforeAll(async () => {
    const instEmail = uniqueEmail('live-inst');
    instructorId = await createUser(instEmail);
    const ids: number[] = [];
    for (let i = 0; i < 4; i++) {
      const email = uniqueEmail(`live-p${i}`);
      ids.push(await createUser(email));
      seats.push({ email });
    }
    courseId = await createCourse('Live course', [
      { userId: instructorId, role: 'instructor' },
      ...ids.map((userId) => ({ userId, role: 'participant' as const })),
    ]);
    instructor = await signIn(instEmail);
    for (const s of seats) s.client = await signIn(s.email);
    outsider = await signIn(uniqueEmail('live-outsider'));
  });

  async function openAndJoin(over = {}) {
    const designId = await createDesign(courseId, instructorId, over);
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    for (const s of seats) {
      expect(await join(clientOf(s), code)).toBe(`/play/${sessionId}`);
      s.socket = await connect(clientOf(s).cookieHeader());
      const ack = await s.socket.emitWithAck('session:watch', { sessionId, as: 'participant' });
      expect(ack.ok).toBe(true);
    }
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.emitWithAck('session:watch', { sessionId, as: 'floor' })).ok).toBe(true);
    return { sessionId, code, staff };
  }

  it('plays two supergames to the end; every acknowledged choice is stored exactly once', async () => {
    const { sessionId, staff } = await openAndJoin({ supergames: 2, delta: 0.5 });
    const acked: { seq: number; clientChoiceId: string | null }[] = [];
    // The final view can arrive before the last acknowledgement: wait for every ack too.
    const acks: Promise<unknown>[] = [];
    const finished = seats.map(
      (s, i) =>
        new Promise<ParticipantView>((resolve) => {
          const done = new Set<string>();
          s.socket!.on('view:participant', async (v) => {
            if (v.status === 'finished') return resolve(v);
            if (v.status !== 'choosing' || v.ownChoice || v.round === null) return;
            const key = `${v.supergame}-${v.round}`;
            if (done.has(key)) return;
            done.add(key);
            const pending = s.socket!.emitWithAck('choice:submit', {
              sessionId,
              supergame: v.supergame,
              round: v.round,
              action: (i + v.round) % 3 === 0 ? 'D' : 'C',
              clientChoiceId: `t-${i}-${key}-abcdef`,
            });
            acks.push(pending);
            const ack = await pending;
            expect(ack.ok).toBe(true);
            if (ack.ok) acked.push({ seq: ack.data.seq, clientChoiceId: ack.data.clientChoiceId });
          });
        }),
    );
    const started = await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    expect(started).toEqual({ ok: true, data: { status: 'running' } });
    const ends = await Promise.all(finished);
    await Promise.all(acks);
    const rows = await storedFor(sessionId);
    expect(rows.length).toBe(acked.length);
    expect(new Set(rows.map((r) => r.clientChoiceId))).toEqual(new Set(acked.map((a) => a.clientChoiceId)));
    expect(rows.every((r) => r.source === 'player')).toBe(true);
    // Both players of a pair see the same draws; the points on the phones equal the stored rows' sum.
    expect(ends.every((v) => v.totalPoints > 0)).toBe(true);
  });

  it('a double submission writes one row and acknowledges the same row; another action for the round is refused', async () => {
    const { sessionId, staff } = await openAndJoin({ supergames: 1, delta: 0.5 });
    const s = seats[0];
    const first = nextView(s.socket!, (v) => v.status === 'choosing');
    await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    const v = await first;
    const payload = { sessionId, supergame: v.supergame, round: v.round!, action: 'C' as const, clientChoiceId: 'double-tap-0001' };
    const [a, b] = await Promise.all([s.socket!.emitWithAck('choice:submit', payload), s.socket!.emitWithAck('choice:submit', payload)]);
    expect(a.ok && b.ok).toBe(true);
    if (a.ok && b.ok) expect(a.data.seq).toBe(b.data.seq);
    const other = await s.socket!.emitWithAck('choice:submit', { ...payload, action: 'D', clientChoiceId: 'another-try-0002' });
    expect(other).toMatchObject({ ok: false, code: 'already-chosen' });
    const mine = await testDb()
      .select()
      .from(choices)
      .where(and(eq(choices.sessionId, sessionId), eq(choices.clientChoiceId, 'double-tap-0001')));
    expect(mine).toHaveLength(1);
    expect((await storedFor(sessionId)).length).toBe(1);
  });

  it('malformed and unauthorised events get error codes and write nothing', async () => {
    const { sessionId } = await openAndJoin({ supergames: 1 });
    const s = seats[1].socket!;
    const bad = await s.emitWithAck('choice:submit', { sessionId, supergame: 1, round: 1, action: 'X', clientChoiceId: 'short' } as never);
    expect(bad).toMatchObject({ ok: false, code: 'bad-payload' });
    const notRunning = await s.emitWithAck('choice:submit', {
      sessionId,
      supergame: 1,
      round: 1,
      action: 'C',
      clientChoiceId: 'before-start-01',
    });
    expect(notRunning).toMatchObject({ ok: false, code: 'session-not-running' });
    const control = await s.emitWithAck('session:control', { sessionId, command: 'start' });
    expect(control).toMatchObject({ ok: false, code: 'forbidden' });
    const act = await s.emitWithAck('participant:act', { sessionId, participantId: '1', action: 'remove' });
    expect(act).toMatchObject({ ok: false, code: 'forbidden' });
    const stranger = await connect(outsider.cookieHeader());
    expect(await stranger.emitWithAck('session:watch', { sessionId, as: 'participant' })).toMatchObject({
      ok: false,
      code: 'not-a-participant',
    });
    expect(await stranger.emitWithAck('session:watch', { sessionId, as: 'floor' })).toMatchObject({ ok: false, code: 'forbidden' });
    expect(
      await stranger.emitWithAck('choice:submit', { sessionId, supergame: 1, round: 1, action: 'C', clientChoiceId: 'stranger-0001' }),
    ).toMatchObject({ ok: false });
    expect(await stranger.emitWithAck('session:watch', { sessionId: 99999999, as: 'floor' })).toMatchObject({
      ok: false,
      code: 'not-found',
    });
    expect(await storedFor(sessionId)).toHaveLength(0);
    // An outsider cannot join a roster session through the page either.
    expect(
      (
        await outsider.post(
          `/join/${(await testDb().query.sessions.findFirst({ where: (t, { eq: e }) => e(t.id, sessionId) }))!.joinCode}`,
          {},
        )
      ).status,
    ).toBe(403);
  });

  it('a participant who reconnects mid-round sees the same round and their choice', async () => {
    const { sessionId, staff } = await openAndJoin({ supergames: 1 });
    const s = seats[2];
    const first = nextView(s.socket!, (v) => v.status === 'choosing');
    await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    const v = await first;
    const ack = await s.socket!.emitWithAck('choice:submit', {
      sessionId,
      supergame: v.supergame,
      round: v.round!,
      action: 'D',
      clientChoiceId: 'before-sleep-01',
    });
    expect(ack.ok).toBe(true);
    s.socket!.close();
    const again = await connect(clientOf(s).cookieHeader());
    const back = await again.emitWithAck('session:watch', { sessionId, as: 'participant' });
    expect(back.ok && back.data.kind).toBe('participant');
    if (back.ok && back.data.kind === 'participant') {
      const view = back.data;
      expect([view.supergame, view.round]).toEqual([v.supergame, v.round]);
      expect(view.ownChoice).toBe('D');
    }
  });

  it('fills a missing choice by the design’s timeout rule when the server’s round timer runs out', async () => {
    const { sessionId, staff } = await openAndJoin({ supergames: 1, roundSeconds: 5, timeout: 'defect' });
    const first = nextView(seats[0].socket!, (v) => v.status === 'choosing');
    await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    const v = await first;
    // seat 0 chooses; everyone else lets the 5-second timer run out
    await seats[0].socket!.emitWithAck('choice:submit', {
      sessionId,
      supergame: 1,
      round: v.round!,
      action: 'C',
      clientChoiceId: 'in-time-00001',
    });
    const resolved = await nextView(seats[0].socket!, (x) => x.history.length >= 1, 12_000);
    expect(resolved.history[0].own).toBe('C');
    // The other pair's timer fires at about the same moment: wait for all four round-1 rows.
    let rows = await testDb()
      .select()
      .from(choices)
      .where(and(eq(choices.sessionId, sessionId), eq(choices.round, 1)));
    for (let i = 0; i < 50 && rows.length < 4; i++) {
      await new Promise((r) => setTimeout(r, 100));
      rows = await testDb()
        .select()
        .from(choices)
        .where(and(eq(choices.sessionId, sessionId), eq(choices.round, 1)));
    }
    const timeouts = rows.filter((r) => r.source === 'timeout');
    expect(timeouts.length).toBe(3);
    expect(timeouts.every((r) => r.action === 'D')).toBe(true);
  });

  it('staff hand a participant to a disclosed computer partner; the partner is told and rows say computer', async () => {
    const { sessionId, staff } = await openAndJoin({ supergames: 1, delta: 0.5 });
    const first = nextView(seats[0].socket!, (v) => v.status === 'choosing');
    await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    const v = await first;
    const state = await staff.emitWithAck('session:watch', { sessionId, as: 'floor' });
    expect(state.ok).toBe(true);
    const floor = state.ok && state.data.kind === 'floor' ? state.data : null;
    const pair = floor!.pairs.find((p) => p.pairId === v.pairId)!;
    const me = seats[0];
    const [partnerSeat] = pair.seats.filter((s) => s.participantId && s.pseudonym !== v.pseudonym);
    const told = nextView(me.socket!, (x) => x.partner?.kind === 'computer');
    const handed = await staff.emitWithAck('participant:act', {
      sessionId,
      participantId: partnerSeat.participantId!,
      action: 'hand-to-computer',
      strategy: 'TFT',
    });
    expect(handed).toEqual({ ok: true, data: { done: true } });
    const view = await told;
    expect(view.partner).toMatchObject({ kind: 'computer', strategy: 'TFT', reason: 'hand-over' });
    // The handed participant opens the phone again while the supergame runs: back in play from the
    // next supergame (a logged re-join), told meanwhile that a computer plays this one for them.
    const views = await Promise.all(
      seats.filter((x) => x.socket).map((x) => x.socket!.emitWithAck('session:watch', { sessionId, as: 'participant' })),
    );
    const back = views
      .map((r) => (r.ok && r.data.kind === 'participant' ? r.data : null))
      .find((x) => x?.pseudonym === partnerSeat.pseudonym);
    expect(back?.notice).toBe('handed-to-computer');
    const log = await testDb().select().from(sessionLog).where(eq(sessionLog.sessionId, sessionId));
    expect(log.map((l) => l.event)).toContainEqual({ type: 'join', participantId: partnerSeat.participantId });
    // (views are broadcast before the acknowledgement returns: listen first)
    const resolved = nextView(me.socket!, (x) => x.history.length >= 1);
    await me.socket!.emitWithAck('choice:submit', {
      sessionId,
      supergame: 1,
      round: view.round!,
      action: 'C',
      clientChoiceId: 'vs-computer-001',
    });
    await resolved;
    const rows = await testDb()
      .select()
      .from(choices)
      .where(and(eq(choices.sessionId, sessionId), eq(choices.pairId, v.pairId!)));
    expect(rows.some((r) => r.source === 'computer' && r.strategy === 'TFT')).toBe(true);
  });

  it('a late joiner enters at the next supergame', async () => {
    const designId = await createDesign(courseId, instructorId, { supergames: 3, delta: 0.5 });
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    for (const s of seats.slice(0, 2)) await join(clientOf(s), code);
    const staff = await connect(instructor.cookieHeader());
    await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    const page = await (await clientOf(seats[3]).get(`/join/${code}`)).text();
    expect(page).toContain('you will be paired from the next supergame on');
    await join(clientOf(seats[3]), code);
    const late = await connect(clientOf(seats[3]).cookieHeader());
    const ack = await late.emitWithAck('session:watch', { sessionId, as: 'participant' });
    expect(ack.ok && ack.data.kind === 'participant' && ack.data.notice).toBe('waiting-to-enter');
  });

  it('nobody new joins the last supergame: the code page says so before the instructions, and a join changes nothing', async () => {
    // Before the fix the late joiner read the instructions, joined, and waited for a supergame that never came.
    const designId = await createDesign(courseId, instructorId, { supergames: 1, delta: 0.5 });
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    for (const s of seats.slice(0, 2)) await join(clientOf(s), code);
    const staff = await connect(instructor.cookieHeader());
    await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    const page = pageText(await (await clientOf(seats[3]).get(`/join/${code}`)).text());
    expect(page).toContain('This session is in its last supergame, so a new player could not play any more rounds.');
    const res = await clientOf(seats[3]).post(`/join/${code}`, {});
    expect(res.status).toBe(409);
    expect(pageText(await res.text())).toContain('last supergame');
    const rows = await testDb().select().from(sessionParticipants).where(eq(sessionParticipants.sessionId, sessionId));
    expect(rows).toHaveLength(2);
  });

  it('assistants may pause and resume, but not start or end a session', async () => {
    const taEmail = uniqueEmail('live-ta');
    const taId = await createUser(taEmail);
    await testDb().insert(courseMembers).values({ courseId, userId: taId, role: 'assistant' });
    const ta = await connect((await signIn(taEmail)).cookieHeader());
    const { sessionId, staff } = await openAndJoin({ supergames: 1 });
    expect(await ta.emitWithAck('session:control', { sessionId, command: 'start' })).toMatchObject({ ok: false, code: 'forbidden' });
    await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    expect(await ta.emitWithAck('session:control', { sessionId, command: 'pause' })).toEqual({ ok: true, data: { status: 'paused' } });
    expect(await ta.emitWithAck('session:control', { sessionId, command: 'end-now' })).toMatchObject({ ok: false, code: 'forbidden' });
    expect(await ta.emitWithAck('session:control', { sessionId, command: 'resume' })).toEqual({ ok: true, data: { status: 'running' } });
    expect((await ta.emitWithAck('session:watch', { sessionId, as: 'floor' })).ok).toBe(true);
  });
});
