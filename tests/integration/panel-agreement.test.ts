// The Debrief (app/models/panel.server.ts, in memory) and the exports (panel-export.server.ts,
// paged and streamed) build the choice panel each their own way; on the same session they must
// give the same rows.
import { and, eq } from 'drizzle-orm';
import { afterAll, expect, it } from 'vitest';
import { loadSessionPanel } from '#app/models/panel.server';
import { panelPages, panelSessions, type PanelRow } from '#app/models/panel-export.server';
import { closeDb } from '#app/utils/db.server';
import { courses, sessions } from '#drizzle/schema';
import { closeTestDb, testDb } from '#tests/helpers/db';

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

it('the Debrief’s panel and the exported panel agree row for row on a demo session', async () => {
  const [demo] = await testDb().select({ id: courses.id }).from(courses).where(eq(courses.isDemo, 1));
  const [s] = await testDb()
    .select({ id: sessions.id })
    .from(sessions)
    .where(and(eq(sessions.courseId, demo.id), eq(sessions.simulated, 1)));
  const debrief = (await loadSessionPanel(demo.id, s.id))!.rows;
  const exported: PanelRow[] = [];
  // identified: keep every participant (the Debrief shows the whole class, consent or not)
  for await (const page of panelPages(await panelSessions(demo.id, [s.id]), { identified: true })) exported.push(...page.rows);
  const key = (r: { pseudonym: string; supergame: number; round: number }) => `${r.pseudonym}/${r.supergame}/${r.round}`;
  const byKey = new Map(exported.map((r) => [key(r), r]));
  expect(exported.length).toBe(debrief.length);
  for (const d of debrief) {
    const e = byKey.get(key({ pseudonym: d.subject, supergame: d.supergame, round: d.round }))!;
    expect([e.action, e.partner_action, e.payoff, e.source, e.draw, e.supergame_length, e.partner]).toEqual([d.action, d.partnerAction, d.payoff, d.source, d.draw, d.supergameLength, d.partner]);
  }
});
