import { and, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { getSession, rebuildSession } from '#app/models/live.server';
import { closeDb } from '#app/utils/db.server';
import { choices, courses, sessions, supergameDraws } from '#drizzle/schema';
import { closeTestDb, testDb } from '#tests/helpers/db';

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

describe('the demo’s two completed sessions (simulated, invented)', () => {
  it('are stored as the engine would store a live session, and rebuild from their rows', async () => {
    // other tests add simulated sessions to their own courses: look at the demo course only
    const [demo] = await testDb().select({ id: courses.id }).from(courses).where(eq(courses.isDemo, true));
    const rows = await testDb()
      .select()
      .from(sessions)
      .where(and(eq(sessions.courseId, demo.id), eq(sessions.simulated, true)));
    expect(rows.map((r) => [r.status, (r.params as { delta: number }).delta])).toEqual([
      ['complete', 0.5],
      ['complete', 0.875],
    ]);
    for (const r of rows) {
      const stored = await getSession(r.id);
      const state = await rebuildSession(stored!);
      expect(state.status).toBe('complete');
      expect(state.joinOrder).toHaveLength(40);
      expect(state.summaries).toHaveLength(stored!.design.supergames);
      // Every supergame's rows: 20 pairs × its length × 2 seats (40 participants, no odd count).
      const draws = await testDb().select().from(supergameDraws).where(eq(supergameDraws.sessionId, r.id));
      for (const d of draws) {
        const n = await testDb()
          .select({ id: choices.id })
          .from(choices)
          .where(and(eq(choices.sessionId, r.id), eq(choices.supergame, d.supergame)));
        expect(n.length).toBe(40 * d.length);
      }
    }
  });
});
