// Faults: a second app server (same database) is killed with SIGKILL at random moments of a
// running session while phones answer all the time, so batches of choices are being written when
// it dies; it is started again each time and the phones reconnect by themselves. After every
// restart: every acknowledged choice is stored once, no round is filled in by a timeout (rounds are
// long, and a restart gives every waiting round its full time again), and the session completes.
// `npm test` runs PARLEY_FAULT_TRIALS=3 kills; `npm run faults` runs 20 (or --trials N).
import { eq, sql } from 'drizzle-orm';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { choices, sessions } from '#drizzle/schema';
import { connectPhone, playCrowd, signInFromHall } from '#tests/helpers/crowd';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, gracesOf, join, openSession } from '#tests/helpers/live';
import { SecondServer } from '#tests/helpers/second-server';

const TRIALS = Math.max(1, Number(process.env.PARLEY_FAULT_TRIALS ?? 3));
const N = 16;
const server = new SecondServer(Number(new URL(process.env.PARLEY_TEST_URL!).port) + 42);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

afterEach(closeSockets);
afterAll(async () => {
  await server.kill('SIGKILL');
  await closeTestDb();
});

describe(`the server killed ${TRIALS} times during play`, () => {
  it(
    'keeps every acknowledged choice exactly once, times nobody out, and the session completes',
    { timeout: 120_000 + TRIALS * 15_000 },
    async () => {
      const instEmail = uniqueEmail('faults-inst');
      const instructorId = await createUser(instEmail);
      const emails = Array.from({ length: N }, (_, i) => uniqueEmail(`faults-${i}`));
      const ids: number[] = [];
      for (const e of emails) ids.push(await createUser(e));
      const courseId = await createCourse('Faults course', [
        { userId: instructorId, role: 'instructor' },
        ...ids.map((userId) => ({ userId, role: 'participant' as const })),
      ]);
      const instructor = (await signIn(instEmail)).at(server.base);
      const players: Client[] = [];
      for (let i = 0; i < N; i += 8)
        players.push(...(await Promise.all(emails.slice(i, i + 8).map((e) => signInFromHall(e, '127.0.9.2')))));
      // Many long supergames (δ = 0.95, expected 20 rounds each): the session outlives every kill,
      // and "end after this supergame" closes it. Rounds of 10 minutes: a timeout row would be a bug.
      const designId = await createDesign(courseId, instructorId, { supergames: 30, delta: 0.95, roundSeconds: 600 });
      await server.start();
      const { sessionId, code } = await openSession(instructor, courseId, designId);
      const atServer = players.map((p) => p.at(server.base));
      for (const p of atServer) await join(p, code);
      const phones = await Promise.all(
        atServer.map(async (p) => ({ socket: await connectPhone(server.base, p.cookieHeader()), sessionId })),
      );

      let unanswered: () => number = () => 0;
      const inFlightAtKill: number[] = [];
      let kills: Promise<void> = Promise.resolve();
      const result = await playCrowd(phones, {
        timeoutMs: 60_000 + TRIALS * 12_000,
        thinkMs: () => Math.floor(Math.random() * 150),
        expose: (f) => (unanswered = f),
        start: async () => {
          const staff = await connect(instructor.cookieHeader(), server.base);
          expect(await staff.emitWithAck('session:control', { sessionId, command: 'start' })).toEqual({
            ok: true,
            data: { status: 'running' },
          });
          staff.close();
          kills = (async () => {
            for (let k = 0; k < TRIALS; k++) {
              await sleep(300 + Math.floor(Math.random() * 1200));
              inFlightAtKill.push(unanswered());
              await server.kill('SIGKILL');
              await server.start();
            }
            // Done killing: close the session at the end of the supergame being played.
            const closer = await connect(instructor.cookieHeader(), server.base);
            const res = await closer.emitWithAck('session:control', { sessionId, command: 'end-after-supergame' });
            expect(res.ok).toBe(true);
            closer.close();
          })();
        },
      });
      await kills;
      for (const p of phones) p.socket.close();
      console.info(
        `[faults] ${TRIALS} kills; choices in flight at each: ${inFlightAtKill.join(', ')}; retried refusals ${JSON.stringify(result.retried)}; ${result.emitted} choices`,
      );

      expect(result.complete).toBe(true);
      expect(result.finished).toBe(N);
      expect(result.refused).toEqual({});
      expect(result.acked.size).toBe(result.emitted);
      // the kills landed while the phones were choosing: choices were being written
      expect(inFlightAtKill.reduce((a, b) => a + b, 0)).toBeGreaterThan(0);

      const rows = await testDb().select().from(choices).where(eq(choices.sessionId, sessionId));
      // no timeouts and no computer seats: every row a phone's choice, each acknowledged id once
      expect(new Set(rows.map((r) => r.source))).toEqual(new Set(['player']));
      const perId = new Map<string, number>();
      for (const r of rows) perId.set(r.clientChoiceId!, (perId.get(r.clientChoiceId!) ?? 0) + 1);
      expect([...perId.values()].every((n) => n === 1)).toBe(true);
      expect(new Set(perId.keys())).toEqual(result.acked);
      // every round of every pair has both seats
      const seats = new Map<string, number>();
      for (const r of rows)
        seats.set(`${r.supergame}/${r.pairId}/${r.round}`, (seats.get(`${r.supergame}/${r.pairId}/${r.round}`) ?? 0) + 1);
      expect([...seats.values()].every((n) => n === 2)).toBe(true);
      const [s] = await testDb().select({ status: sessions.status, seq: sessions.seq }).from(sessions).where(eq(sessions.id, sessionId));
      expect(s.status).toBe('complete');
      // the session row's sequence is the last stored row's
      const [{ top }] = await testDb()
        .select({
          top: sql<number>`GREATEST((SELECT MAX(seq) FROM choices WHERE session_id = ${sessionId}), (SELECT MAX(seq) FROM session_log WHERE session_id = ${sessionId}))`,
        })
        .from(sessions)
        .where(eq(sessions.id, sessionId));
      expect(s.seq).toBe(Number(top));
      // at most one grace per restart
      const graces = await gracesOf(sessionId);
      expect(graces.length).toBeLessThanOrEqual(TRIALS);
      // a last rebuild of the whole stored session (a fresh process loads it for the Floor) succeeds
      await server.kill('SIGKILL');
      await server.start();
      const staff = await connect(instructor.cookieHeader(), server.base);
      const floor = await staff.emitWithAck('session:watch', { sessionId, as: 'floor' });
      expect(floor.ok && 'status' in floor.data && floor.data.status).toBe('complete');
    },
  );
});
