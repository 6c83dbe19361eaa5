// 60 participants with real sign-in cookies play three supergames over socket.io.
import { eq } from 'drizzle-orm';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { choices, supergameDraws } from '#drizzle/schema';
import type { ParticipantView } from '#realtime/engine/types';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, join, openSession } from '#tests/helpers/live';

afterEach(closeSockets);
afterAll(closeTestDb);

const N = 60;

describe('a room of 60 phones', () => {
  it('stores every acknowledged choice exactly once and keeps every pair’s history consistent', { timeout: 120_000 }, async () => {
    const instEmail = uniqueEmail('crowd-inst');
    const instructorId = await createUser(instEmail);
    const emails = Array.from({ length: N }, (_, i) => uniqueEmail(`crowd-${i}`));
    const ids: number[] = [];
    for (const e of emails) ids.push(await createUser(e));
    const courseId = await createCourse('Crowd course', [{ userId: instructorId, role: 'instructor' }, ...ids.map((userId) => ({ userId, role: 'participant' as const }))]);
    const instructor = await signIn(instEmail);
    const players: Client[] = [];
    for (let i = 0; i < N; i += 10) players.push(...(await Promise.all(emails.slice(i, i + 10).map((e) => signIn(e)))));
    const designId = await createDesign(courseId, instructorId, { supergames: 3, delta: 0.5 });
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    for (const p of players) await join(p, code);
    const sockets = await Promise.all(players.map((p) => connect(p.cookieHeader())));
    for (const s of sockets) expect((await s.emitWithAck('session:watch', { sessionId, as: 'participant' })).ok).toBe(true);

    const acked = new Set<string>();
    // The final view can arrive before the last acknowledgement: wait for every ack too.
    const acks: Promise<unknown>[] = [];
    const finished = sockets.map(
      (s, i) =>
        new Promise<ParticipantView>((resolve) => {
          const seen = new Set<string>();
          s.on('view:participant', async (v) => {
            if (v.status === 'finished') return resolve(v);
            if (v.status !== 'choosing' || v.ownChoice || v.round === null) return;
            const key = `${v.supergame}-${v.round}`;
            if (seen.has(key)) return;
            seen.add(key);
            const id = `crowd-${i}-${key}`;
            const pending = s.emitWithAck('choice:submit', { sessionId, supergame: v.supergame, round: v.round, action: Math.random() < 0.6 ? 'C' : 'D', clientChoiceId: id });
            acks.push(pending);
            if ((await pending).ok) acked.add(id);
          });
        }),
    );
    const staff = await connect(instructor.cookieHeader());
    expect(await staff.emitWithAck('session:control', { sessionId, command: 'start' })).toEqual({ ok: true, data: { status: 'running' } });
    await Promise.all(finished);
    await Promise.all(acks);

    const rows = await testDb().select().from(choices).where(eq(choices.sessionId, sessionId));
    expect(rows.length).toBe(acked.size);
    expect(new Set(rows.map((r) => r.clientChoiceId)).size).toBe(rows.length);
    const lengths = new Map((await testDb().select().from(supergameDraws).where(eq(supergameDraws.sessionId, sessionId))).map((d) => [d.supergame, d.length]));
    // Every pair: both seats in every round 1..L of its supergame, nothing else (common practice:
    // all pairs of a session share one draw sequence, so one length per supergame).
    const byPair = new Map<string, number[]>();
    for (const r of rows) byPair.set(`${r.supergame}/${r.pairId}/${r.round}`, [...(byPair.get(`${r.supergame}/${r.pairId}/${r.round}`) ?? []), r.seat]);
    for (const seatsSeen of byPair.values()) expect(seatsSeen.sort()).toEqual([0, 1]);
    for (const [sg, L] of lengths) {
      const pairs = new Set(rows.filter((r) => r.supergame === sg).map((r) => r.pairId));
      expect(pairs.size).toBe(N / 2);
      for (const p of pairs) {
        const rounds = [...new Set(rows.filter((r) => r.supergame === sg && r.pairId === p).map((r) => r.round))].sort((a, b) => a - b);
        expect(rounds).toEqual(Array.from({ length: L }, (_, k) => k + 1));
      }
    }
  });
});
