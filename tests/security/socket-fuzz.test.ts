// Malformed socket payloads at the hub (docs/security.md, "Bad or huge input changes nothing"):
// more than 10,000 generated payloads — wrong types, missing fields, unknown and prototype keys,
// numbers out of range, huge strings, deep nesting, arrays and scalars instead of objects — for
// every event, with and without an acknowledgement, from signed-in participants and the
// instructor of a running session. The server stays up, every payload sent with an ack gets an
// error code, and no row is written.
import { count, eq } from 'drizzle-orm';
import fc from 'fast-check';
import type { Socket } from 'socket.io-client';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { choices, sessionLog, sessionParticipants } from '#drizzle/schema';
import { ChoiceSubmit, MeGet, ParticipantAction, SessionControl, SessionWatch } from '#realtime/protocol';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { baseUrl, signIn, uniqueEmail } from '#tests/helpers/http';
import { classOf, closeSockets, connect, createDesign, join, nextView, openSession, type TestSocket } from '#tests/helpers/live';

afterEach(closeSockets);
afterAll(closeTestDb);

/**
 * The same socket without the protocol's types (socket.io's default map: any event, any
 * arguments), to send what a hostile client can send.
 */
const untyped = (s: TestSocket): Socket => s;

/** Codes a malformed payload may get: refused by validation, by role, or by the per-socket rate limit. */
const ERROR_CODES = new Set(['bad-payload', 'forbidden', 'rate-limited']);
const SEED = 20261202;

type EventName = 'me:get' | 'session:watch' | 'choice:submit' | 'session:control' | 'participant:act';

function templates(
  sessionId: number,
): Record<EventName, { schema: { safeParse: (x: unknown) => { success: boolean } }; valid: Record<string, unknown> }> {
  return {
    'me:get': { schema: MeGet, valid: {} },
    'session:watch': { schema: SessionWatch, valid: { sessionId, as: 'participant' } },
    'choice:submit': {
      schema: ChoiceSubmit,
      valid: { sessionId, supergame: 1, round: 1, action: 'C', clientChoiceId: 'fuzz-choice-0001' },
    },
    'session:control': { schema: SessionControl, valid: { sessionId, command: 'pause' } },
    'participant:act': { schema: ParticipantAction, valid: { sessionId, participantId: '1', action: 'nudge' } },
  };
}

/** An own, enumerable key such as `__proto__`, as JSON.parse makes it (and socket.io sends it). */
function withKey(o: Record<string, unknown>, key: string, value: unknown) {
  const copy: Record<string, unknown> = { ...o };
  Object.defineProperty(copy, key, { value, enumerable: true, writable: true, configurable: true });
  return copy;
}

const deep = (depth: number, leaf: unknown): unknown => {
  let v: unknown = leaf;
  for (let i = 0; i < depth; i++) v = i % 2 ? { a: v } : [v];
  return v;
};

const wrongValue = fc.oneof(
  fc.string({ maxLength: 20 }),
  fc.integer(),
  fc.double(),
  fc.boolean(),
  fc.constant(null),
  fc.array(fc.anything({ maxDepth: 2 }), { maxLength: 4 }),
  fc.dictionary(fc.string({ maxLength: 6 }), fc.anything({ maxDepth: 2 }), { maxKeys: 4 }),
  fc.constantFrom(0, -1, 1.5, -0.000001, 2 ** 31, 2 ** 53, Number.MAX_VALUE, -Number.MAX_VALUE, Number.MIN_VALUE),
  // past every length limit, but under the hub's 32 KB message cap even five at once (a larger
  // message closes the socket: the last test below)
  fc.integer({ min: 65, max: 5_000 }).map((n) => 'x'.repeat(n)),
  fc.integer({ min: 10, max: 300 }).map((d) => deep(d, 1)),
);

/** Payloads for one event that its own schema refuses, in every way we could think of. */
function malformed(t: { schema: { safeParse: (x: unknown) => { success: boolean } }; valid: Record<string, unknown> }) {
  const keys = Object.keys(t.valid);
  const mutations: fc.Arbitrary<unknown>[] = [
    // a scalar, an array or a huge or deep value instead of an object
    wrongValue,
    fc.constant(Object.values(t.valid)),
    fc.constant([t.valid]),
    // an unknown key, or a prototype key, beside the right ones
    fc
      .tuple(
        fc.oneof(
          fc.constantFrom('__proto__', 'constructor', 'prototype', 'toString', 'hasOwnProperty', 'valueOf'),
          fc.string({ minLength: 1, maxLength: 30 }),
        ),
        fc.anything({ maxDepth: 3 }),
      )
      .map(([k, v]) => withKey(t.valid, k, v)),
  ];
  if (keys.length) {
    const key = fc.constantFrom(...keys);
    // a field of the wrong type, out of range, huge or deeply nested
    mutations.push(fc.tuple(key, wrongValue).map(([k, v]) => ({ ...t.valid, [k]: v })));
    // a field missing
    mutations.push(key.map((k) => Object.fromEntries(Object.entries(t.valid).filter(([kk]) => kk !== k))));
    // several fields wrong at once
    mutations.push(fc.dictionary(key, wrongValue, { minKeys: 2 }).map((d) => ({ ...t.valid, ...d })));
  }
  // Judged as the hub receives it: after JSON (NaN becomes null, undefined fields vanish), and a
  // missing payload read as {} (which me:get accepts). Only what the event's schema refuses counts.
  return fc.oneof(...mutations).filter((p) => {
    const wire: unknown = JSON.parse(JSON.stringify(p) ?? 'null');
    return !t.schema.safeParse(wire ?? {}).success;
  });
}

async function rowsOf(sessionId: number) {
  const [[c], [l], [p]] = await Promise.all([
    testDb().select({ n: count() }).from(choices).where(eq(choices.sessionId, sessionId)),
    testDb().select({ n: count() }).from(sessionLog).where(eq(sessionLog.sessionId, sessionId)),
    testDb().select({ n: count() }).from(sessionParticipants).where(eq(sessionParticipants.sessionId, sessionId)),
  ]);
  return { choices: c.n, log: l.n, participants: p.n };
}

const healthy = async () => (await fetch(new URL('/healthz', baseUrl()))).ok;

describe('malformed socket payloads', () => {
  it(
    '10,000+ generated payloads for every event: the server stays up, each ack is an error code, nothing is written',
    { timeout: 240_000 },
    async () => {
      const instEmail = uniqueEmail('fuzz-inst');
      const instructorId = await createUser(instEmail);
      const emails = [uniqueEmail('fuzz-a'), uniqueEmail('fuzz-b')];
      const ids = await Promise.all(emails.map((e) => createUser(e)));
      const courseId = await createCourse('Fuzz course', [
        { userId: instructorId, role: 'instructor' },
        ...ids.map((userId) => ({ userId, role: 'participant' as const })),
      ]);
      const instructor = await signIn(instEmail);
      const players = await Promise.all(emails.map((e) => signIn(e)));
      // Long rounds: no timeout may write a row while the fuzz runs.
      const designId = await createDesign(courseId, instructorId, { supergames: 1, delta: 0.5, roundSeconds: 600 });
      const { sessionId, code } = await openSession(instructor, courseId, designId);
      for (const p of players) await join(p, code);
      const sockets: TestSocket[] = [];
      for (const p of players) {
        const s = await connect(p.cookieHeader());
        expect((await s.emitWithAck('session:watch', { sessionId, as: 'participant' })).ok).toBe(true);
        sockets.push(s);
      }
      const staff = await connect(instructor.cookieHeader());
      const choosing = nextView(sockets[0], (v) => v.status === 'choosing' && v.round === 1);
      expect(await staff.emitWithAck('session:control', { sessionId, command: 'start' })).toEqual({
        ok: true,
        data: { status: 'running' },
      });
      const first = await choosing;
      sockets.push(staff);
      let disconnects = 0;
      for (const s of sockets) s.on('disconnect', () => disconnects++);

      const before = await rowsOf(sessionId);
      const t = templates(sessionId);
      const events = Object.keys(t) as EventName[];
      // Per event: 1,700 with an ack and 400 without; plus 500 events nobody handles.
      const plan: { event: string; payload: unknown; ack: boolean }[] = [];
      events.forEach((event, k) => {
        const payloads = fc.sample(malformed(t[event]), { numRuns: 2100, seed: SEED + k });
        payloads.forEach((payload, i) => plan.push({ event, payload, ack: i < 1700 }));
      });
      fc.sample(fc.tuple(fc.string({ minLength: 1, maxLength: 40 }), fc.anything({ maxDepth: 3 })), {
        numRuns: 500,
        seed: SEED - 1,
      }).forEach(([name, payload]) =>
        // socket.io's own reserved names cannot be emitted by a client at all
        plan.push({
          event: ['connect', 'connect_error', 'disconnect', 'disconnecting', 'newListener', 'removeListener'].includes(name)
            ? `x-${name}`
            : `${name}:fuzz`,
          payload,
          ack: false,
        }),
      );
      expect(plan.length).toBeGreaterThanOrEqual(11_000);
      expect(plan.filter((p) => p.ack).length).toBeGreaterThanOrEqual(8_500);

      const codes = new Map<string, number>();
      const unanswered: string[] = [];
      const badShape: unknown[] = [];
      const BATCH = 100;
      const fuzzers = sockets.map(untyped);
      for (let i = 0; i < plan.length; i += BATCH) {
        await Promise.all(
          plan.slice(i, i + BATCH).map(async ({ event, payload, ack }, k) => {
            // Spread over the sockets (per-socket rate limits), the instructor's included.
            const s = fuzzers[(i + k) % fuzzers.length];
            if (!ack) return void s.emit(event, payload);
            try {
              const res: { ok?: unknown; code?: unknown; message?: unknown } | null | undefined = await s
                .timeout(15_000)
                .emitWithAck(event, payload);
              if (res?.ok !== false || typeof res.code !== 'string' || typeof res.message !== 'string') badShape.push(res);
              else codes.set(res.code, (codes.get(res.code) ?? 0) + 1);
            } catch {
              unanswered.push(`${event} ${JSON.stringify(payload)?.slice(0, 120)}`);
            }
          }),
        );
        if (i % 2000 === 0) expect(await healthy()).toBe(true);
      }

      expect(unanswered).toEqual([]);
      expect(badShape).toEqual([]);
      for (const c of codes.keys()) expect(ERROR_CODES).toContain(c);
      expect([...codes.values()].reduce((a, b) => a + b, 0)).toBe(plan.filter((p) => p.ack).length);
      expect(codes.get('bad-payload') ?? 0).toBeGreaterThan(0);
      expect(disconnects).toBe(0);
      expect(await healthy()).toBe(true);
      expect(await rowsOf(sessionId)).toEqual(before);

      // The hub still serves the same sockets: a real choice is stored (one row more).
      const ok = await sockets[0].emitWithAck('choice:submit', {
        sessionId,
        supergame: 1,
        round: first.round!,
        action: 'C',
        clientChoiceId: `fuzz-real-${Date.now()}`,
      });
      expect(ok.ok).toBe(true);
      expect((await rowsOf(sessionId)).choices).toBe(before.choices + 1);
    },
  );

  it('a message over the 32 KB cap closes only that socket; the server and the others go on', { timeout: 60_000 }, async () => {
    const a = await signIn(uniqueEmail('fuzz-big'));
    const big = await connect(a.cookieHeader());
    const other = await connect(a.cookieHeader());
    const closed = new Promise<string>((resolve) => big.on('disconnect', (reason) => resolve(reason)));
    untyped(big).emit('me:get', { pad: 'x'.repeat(40_000) });
    expect(await closed).toBe('transport close');
    expect(await healthy()).toBe(true);
    expect(await other.emitWithAck('me:get', {})).toMatchObject({ ok: true });
  });

  it('an extra argument before the ack is answered bad-payload and changes nothing; an ack alone reads as an empty payload', async () => {
    const { sessionId, instructor, players } = await classOf(2, { design: { supergames: 1, roundSeconds: 600 }, tag: 'fuzz-extra' });
    const staff = untyped(await connect(instructor.cookieHeader()));
    const phone = untyped(await connect(players[0].cookieHeader()));
    expect(await phone.timeout(5000).emitWithAck('session:watch', { sessionId, as: 'participant' })).toMatchObject({ ok: true });
    const before = await rowsOf(sessionId);
    // socket.io hands the listener every argument, the ack last: the hub took the second argument
    // as the ack, so these went unanswered (and the phone waited for nothing).
    expect(await staff.timeout(5000).emitWithAck('session:control', { sessionId, command: 'start' }, 'extra')).toMatchObject({
      ok: false,
      code: 'bad-payload',
    });
    const choice = { sessionId, supergame: 1, round: 1, action: 'C', clientChoiceId: 'extra-arg-0001' };
    expect(await phone.timeout(5000).emitWithAck('choice:submit', choice, { more: 1 }, 2)).toMatchObject({
      ok: false,
      code: 'bad-payload',
    });
    expect(await rowsOf(sessionId)).toEqual(before);
    // Still open: the same command without the extra argument is what starts it.
    expect(await staff.timeout(5000).emitWithAck('session:control', { sessionId, command: 'start' })).toEqual({
      ok: true,
      data: { status: 'running' },
    });
    expect(await phone.timeout(5000).emitWithAck('me:get')).toMatchObject({ ok: true });
  });
});
