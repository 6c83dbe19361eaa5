// Issue 9, finding 12 (first half): socket events had no rate limit; 3,000 `session:watch` in a
// second made 3,000 floor views. Each socket now has a token bucket per event kind.
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { EVENT_LIMITS } from '#realtime/rate-limit';
import { closeTestDb, createCourse, createUser } from '#tests/helpers/db';
import { baseUrl, type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, join, nextView, openSession } from '#tests/helpers/live';

afterEach(closeSockets);
afterAll(closeTestDb);

let instructor: Client;
let instructorId: number;
let courseId: number;
const players: Client[] = [];

beforeAll(async () => {
  const email = uniqueEmail('flood-inst');
  instructorId = await createUser(email);
  const emails = [uniqueEmail('flood-a'), uniqueEmail('flood-b')];
  const ids = [await createUser(emails[0]), await createUser(emails[1])];
  courseId = await createCourse('Flood course', [
    { userId: instructorId, role: 'instructor' },
    ...ids.map((userId) => ({ userId, role: 'participant' as const })),
  ]);
  instructor = await signIn(email);
  for (const e of emails) players.push(await signIn(e));
});

describe('socket floods', () => {
  it('3,000 session:watch in a burst: all but the allowed few are answered rate-limited; the server stays up and play goes on', async () => {
    const designId = await createDesign(courseId, instructorId, { supergames: 1, delta: 0.5 });
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    for (const p of players) await join(p, code);

    const staff = await connect(instructor.cookieHeader());
    const started = Date.now();
    const acks = await Promise.all(Array.from({ length: 3000 }, () => staff.emitWithAck('session:watch', { sessionId, as: 'floor' })));
    const seconds = (Date.now() - started) / 1000;
    const ok = acks.filter((a) => a.ok).length;
    const limited = acks.filter((a) => !a.ok && a.code === 'rate-limited').length;
    // Only the burst plus the steady rate over the flood's duration was built.
    const spec = EVENT_LIMITS['session:watch'];
    expect(ok).toBeGreaterThanOrEqual(1);
    expect(ok).toBeLessThanOrEqual(spec.burst + Math.ceil(seconds * spec.perSecond) + 1);
    expect(ok + limited).toBe(3000);
    expect(limited).toBeGreaterThan(2900);
    const refused = acks.find((a) => !a.ok);
    expect(refused).toMatchObject({ ok: false, code: 'rate-limited', message: expect.any(String) });

    // The server is up, and the same socket's other kinds of events are not blocked by the flood.
    expect((await fetch(new URL('/healthz', baseUrl()))).status).toBe(200);
    const control = await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    expect(control).toMatchObject({ ok: true });

    // Normal clients still play: watch, choose, and retry a choice (a double tap).
    const sockets = await Promise.all(players.map((p) => connect(p.cookieHeader())));
    const views = await Promise.all(sockets.map((s) => s.emitWithAck('session:watch', { sessionId, as: 'participant' })));
    expect(views.every((v) => v.ok)).toBe(true);
    const first = views[0].ok && views[0].data.kind === 'participant' ? views[0].data : null;
    const choosing = first?.status === 'choosing' ? first : await nextView(sockets[0], (v) => v.status === 'choosing');
    const choice = {
      sessionId,
      supergame: choosing.supergame,
      round: choosing.round!,
      action: 'C' as const,
      clientChoiceId: 'flood-choice-1',
    };
    const a1 = await sockets[0].emitWithAck('choice:submit', choice);
    const a2 = await sockets[0].emitWithAck('choice:submit', choice);
    expect(a1.ok).toBe(true);
    expect(a2.ok).toBe(true);
  });
});
