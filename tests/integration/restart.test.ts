// A second app server on its own port (same database) that the test kills with SIGKILL mid-round
// and starts again: no acknowledged choice may be lost and the session must finish.
import { and, eq } from 'drizzle-orm';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { choices, sessions } from '#drizzle/schema';
import type { ParticipantView } from '#realtime/engine/types';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, join, nextView, openSession } from '#tests/helpers/live';
import { SecondServer } from '#tests/helpers/second-server';

const server = new SecondServer(Number(new URL(process.env.PARLEY_TEST_URL!).port) + 40);
const base = server.base;
const startServer = () => server.start();
const killServer = (signal: NodeJS.Signals) => server.kill(signal);

afterEach(closeSockets);
afterAll(async () => {
  await killServer('SIGKILL');
  await closeTestDb();
});

describe('a server killed mid-round', () => {
  it('rebuilds the session from the database, keeps every acknowledged choice, and finishes', { timeout: 120_000 }, async () => {
    const instEmail = uniqueEmail('kill-inst');
    const instructorId = await createUser(instEmail);
    const emails = [uniqueEmail('kill-a'), uniqueEmail('kill-b')];
    const ids = [await createUser(emails[0]), await createUser(emails[1])];
    const courseId = await createCourse('Restart course', [
      { userId: instructorId, role: 'instructor' },
      ...ids.map((userId) => ({ userId, role: 'participant' as const })),
    ]);
    await startServer();
    const instructor = (await signIn(instEmail)).at(base);
    const players = [(await signIn(emails[0])).at(base), (await signIn(emails[1])).at(base)];
    const designId = await createDesign(courseId, instructorId, { supergames: 1, delta: 0.5 });
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    for (const p of players) await join(p, code);

    let sockets = await Promise.all(players.map((p) => connect(p.cookieHeader(), base)));
    for (const s of sockets) expect((await s.emitWithAck('session:watch', { sessionId, as: 'participant' })).ok).toBe(true);
    const staff = await connect(instructor.cookieHeader(), base);
    const first = nextView(sockets[0], (v) => v.status === 'choosing');
    await staff.emitWithAck('session:control', { sessionId, command: 'start' });
    const v = await first;
    const ack = await sockets[0].emitWithAck('choice:submit', {
      sessionId,
      supergame: 1,
      round: v.round!,
      action: 'C',
      clientChoiceId: 'acked-before-kill',
    });
    expect(ack.ok).toBe(true);

    await killServer('SIGKILL');
    closeSockets();
    await startServer();

    sockets = await Promise.all(players.map((p) => connect(p.cookieHeader(), base)));
    const views = await Promise.all(sockets.map((s) => s.emitWithAck('session:watch', { sessionId, as: 'participant' })));
    const mine = views[0].ok ? (views[0].data as ParticipantView) : null;
    expect(mine?.round).toBe(v.round);
    expect(mine?.ownChoice).toBe('C');

    // Play on to the end: both choose C whenever asked.
    const done = sockets.map(
      (s, i) =>
        new Promise<void>((resolve) => {
          const seen = new Set<string>();
          const act = async (view: ParticipantView) => {
            if (view.status === 'finished') return resolve();
            if (view.status !== 'choosing' || view.ownChoice || view.round === null) return;
            const key = `${view.supergame}-${view.round}`;
            if (seen.has(key)) return;
            seen.add(key);
            await s.emitWithAck('choice:submit', {
              sessionId,
              supergame: view.supergame,
              round: view.round,
              action: 'C',
              clientChoiceId: `after-${i}-${key}`,
            });
          };
          s.on('view:participant', act);
          const initial = views[i];
          if (initial.ok) void act(initial.data as ParticipantView);
        }),
    );
    await Promise.all(done);
    const [row] = await testDb().select({ status: sessions.status }).from(sessions).where(eq(sessions.id, sessionId));
    expect(row.status).toBe('complete');
    const kept = await testDb()
      .select()
      .from(choices)
      .where(and(eq(choices.sessionId, sessionId), eq(choices.clientChoiceId, 'acked-before-kill')));
    expect(kept).toHaveLength(1);
    expect(kept[0].action).toBe('C');
  });
});
