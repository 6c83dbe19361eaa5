// A room of 100 phones with real sign-ins plays two supergames over socket.io, every phone
// answering the moment its choosing view arrives (the play of `npm run bench:live`, untimed):
// complete, and every acknowledged choice stored exactly once.
import { eq } from 'drizzle-orm';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { choices, supergameDraws } from '#drizzle/schema';
import { connectPhone, playCrowd, signInFromHall } from '#tests/helpers/crowd';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { baseUrl, type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, join, openSession } from '#tests/helpers/live';

afterEach(closeSockets);
afterAll(closeTestDb);

const N = 100;

describe('a room of 100 phones', () => {
  it(
    'completes two supergames and stores every acknowledged choice exactly once, every pair’s history consistent',
    { timeout: 240_000 },
    async () => {
      const instEmail = uniqueEmail('crowd-inst');
      const instructorId = await createUser(instEmail);
      const emails = Array.from({ length: N }, (_, i) => uniqueEmail(`crowd-${i}`));
      const ids: number[] = [];
      for (const e of emails) ids.push(await createUser(e));
      const courseId = await createCourse('Crowd course', [
        { userId: instructorId, role: 'instructor' },
        ...ids.map((userId) => ({ userId, role: 'participant' as const })),
      ]);
      const instructor = await signIn(instEmail);
      const players: Client[] = [];
      for (let i = 0; i < N; i += 10) players.push(...(await Promise.all(emails.slice(i, i + 10).map((e) => signInFromHall(e)))));
      // Long rounds: a timeout row would mean a phone's answer was lost, not that it was slow.
      const designId = await createDesign(courseId, instructorId, { supergames: 2, delta: 0.5, roundSeconds: 600 });
      const { sessionId, code } = await openSession(instructor, courseId, designId);
      for (const p of players) await join(p, code);
      const phones = await Promise.all(players.map(async (p) => ({ socket: await connectPhone(baseUrl(), p.cookieHeader()), sessionId })));
      const staff = await connect(instructor.cookieHeader());

      const result = await playCrowd(phones, {
        timeoutMs: 150_000,
        start: async () => {
          expect(await staff.emitWithAck('session:control', { sessionId, command: 'start' })).toEqual({
            ok: true,
            data: { status: 'running' },
          });
        },
      });
      for (const p of phones) p.socket.close();

      expect(result.complete).toBe(true);
      expect(result.finished).toBe(N);
      expect(result.refused).toEqual({});
      expect(result.acked.size).toBe(result.emitted);
      const rows = await testDb().select().from(choices).where(eq(choices.sessionId, sessionId));
      // Every choice was a phone's: none filled in by a timeout or a computer seat.
      expect(new Set(rows.map((r) => r.source))).toEqual(new Set(['player']));
      expect(rows.length).toBe(result.acked.size);
      expect(new Set(rows.map((r) => r.clientChoiceId))).toEqual(result.acked);
      const lengths = new Map(
        (await testDb().select().from(supergameDraws).where(eq(supergameDraws.sessionId, sessionId))).map((d) => [d.supergame, d.length]),
      );
      expect(lengths.size).toBe(2);
      // Every pair: both seats in every round 1..L of its supergame, nothing else (common practice:
      // all pairs of a session share one draw sequence, so one length per supergame).
      const seatsOf = new Map<string, number[]>();
      for (const r of rows)
        seatsOf.set(`${r.supergame}/${r.pairId}/${r.round}`, [...(seatsOf.get(`${r.supergame}/${r.pairId}/${r.round}`) ?? []), r.seat]);
      for (const seats of seatsOf.values()) expect(seats.sort()).toEqual([0, 1]);
      for (const [sg, L] of lengths) {
        const pairs = new Set(rows.filter((r) => r.supergame === sg).map((r) => r.pairId));
        expect(pairs.size).toBe(N / 2);
        for (const p of pairs) {
          const rounds = [...new Set(rows.filter((r) => r.supergame === sg && r.pairId === p).map((r) => r.round))].sort((a, b) => a - b);
          expect(rounds).toEqual(Array.from({ length: L }, (_, k) => k + 1));
        }
      }
      expect(rows.length).toBe(N * [...lengths.values()].reduce((a, b) => a + b, 0));
    },
  );
});
