// The Debrief through the real server: role guards, a participant's own summary, CSV downloads,
// and a strategy-frequency estimation with a bootstrap on worker threads (the production build's
// worker entry), stored, polled to the end and reused for the same request.
import { and, eq } from 'drizzle-orm';
import jstat from 'jstat';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessionDebrief } from '#app/lib/debrief';
import { designSchema } from '#app/lib/design';
import { createDataset } from '#app/models/datasets.server';
import type { EstimateStatus } from '#app/models/estimate.server';
import { participantKeyOf, writeEffects } from '#app/models/live.server';
import { estimationRows } from '#app/lib/choice-panel';
import { loadSessionPanel } from '#app/models/panel.server';
import { closeDb } from '#app/utils/db.server';
import { courses, estimates, sessions, supergameDraws, users } from '#drizzle/schema';
import { simulateSession } from '#seeds/simulate';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

/** A completed session of `courseId`, simulated through the engine like the demo's. */
async function simulatedSession(courseId: number, createdBy: number, players: number[], delta: number, seed: number) {
  const design = designSchema.parse({
    payoffs: { R: 40, S: 12, T: 50, P: 25 },
    delta,
    supergames: 6,
    roundSeconds: 15,
    oddCount: { kind: 'computer', strategy: 'TFT' },
  });
  const treatment = `Test δ = ${delta} (${seed})`;
  const [res] = await testDb()
    .insert(sessions)
    .values({ courseId, treatment, params: design, seed, status: 'draft', simulated: true, createdBy });
  const sim = simulateSession({
    sessionId: String(res.insertId),
    design,
    seed,
    participantIds: players.map(participantKeyOf),
    mixture: { ALLD: 0.4, TFT: 0.4, ALLC: 0.2 },
    rngSeed: seed,
    startMs: Date.UTC(2027, 0, 1),
  });
  await writeEffects(testDb(), res.insertId, sim.effects, createdBy);
  return res.insertId;
}

const roles = ['instructor', 'assistant', 'researcher', 'participant', 'bystander', 'outsider'] as const;
type Who = (typeof roles)[number];
const clients = {} as Record<Who, Client>;
const ids = {} as Record<Who, number>;
let courseId: number;
let otherCourseId: number;
let sessionId: number;
let otherSessionId: number;

beforeAll(async () => {
  for (const r of roles) ids[r] = await createUser(uniqueEmail(r));
  // five players (an odd count: a disclosed computer partner every supergame)
  const others = [];
  for (let i = 0; i < 4; i++) others.push(await createUser(uniqueEmail('player')));
  courseId = await createCourse('Debrief course', [
    { userId: ids.instructor, role: 'instructor' },
    { userId: ids.assistant, role: 'assistant' },
    { userId: ids.researcher, role: 'researcher' },
    { userId: ids.participant, role: 'participant' },
    { userId: ids.bystander, role: 'participant' },
    ...others.map((userId) => ({ userId, role: 'participant' as const })),
  ]);
  otherCourseId = await createCourse('Another course', [{ userId: ids.outsider, role: 'instructor' }]);
  sessionId = await simulatedSession(courseId, ids.instructor, [ids.participant, ...others], 0.75, 4101);
  otherSessionId = await simulatedSession(otherCourseId, ids.outsider, others.slice(0, 3).concat(ids.outsider), 0.5, 4102);
  for (const r of roles) {
    const [u] = await testDb().select({ email: users.email }).from(users).where(eq(users.id, ids[r]));
    clients[r] = await signIn(u.email);
  }
});

describe('who sees a Debrief', () => {
  const staffPaths = () => [
    `/courses/${courseId}/debrief`,
    `/courses/${courseId}/debrief/${sessionId}`,
    `/courses/${courseId}/debrief/compare?sessions=${sessionId}`,
    `/courses/${courseId}/debrief/projector?sessions=${sessionId}`,
    `/courses/${courseId}/debrief/csv/cooperation-by-supergame?sessions=${sessionId}`,
  ];

  it('instructor, assistant and researcher: 200 on every Debrief page and download', async () => {
    for (const r of ['instructor', 'assistant', 'researcher'] as const)
      for (const p of staffPaths()) expect([r, p, (await clients[r].get(p)).status]).toEqual([r, p, 200]);
  });

  it('the staff Debrief is de-identified: pseudonyms, no names or e-mails', async () => {
    const page = await (await clients.researcher.get(`/courses/${courseId}/debrief/csv/points?sessions=${sessionId}`)).text();
    expect(page.split('\n')[0]).toBe('session,treatment,pseudonym,points');
    expect(page).toContain('P-001');
    expect(page).not.toMatch(/@tests\.parley\.test/);
  });

  it('a participant gets 403 on the staff Debrief, and 200 on their own summary', async () => {
    for (const p of staffPaths()) expect([p, (await clients.participant.get(p)).status]).toEqual([p, 403]);
    const status = await clients.participant.get(`/courses/${courseId}/estimates/1`);
    expect(status.status).toBe(403);
    const post = await clients.participant.post(`/courses/${courseId}/estimates`, {
      sessions: String(sessionId),
      windowKind: 'all',
      preset: 'dbf2011',
      bootstrap: 10,
      seed: 1,
    });
    expect(post.status).toBe(403);

    const mine = await clients.participant.get(`/courses/${courseId}/debrief/${sessionId}/mine`);
    expect(mine.status).toBe(200);
    const html = await mine.text();
    expect(html).toContain('Your summary');
    // the participant's own points, from the same rows the Debrief uses
    const panel = (await loadSessionPanel(courseId, sessionId))!;
    const pseudonym = /you were <strong>(P-\d{3})<\/strong>/.exec(html)?.[1];
    expect(pseudonym).toMatch(/^P-\d{3}$/);
    const points = panel.rows.filter((r) => r.pseudonym === pseudonym && r.paid === 1).reduce((t, r) => t + r.payoff, 0);
    expect(html).toContain(`data-testid="total-points">${points}<`);
    // partners stay anonymous: no other pseudonym on the page
    const others = new Set(panel.rows.map((r) => r.pseudonym).filter((s) => s !== pseudonym));
    for (const o of others) expect(html).not.toContain(o);
  });

  it('a member who did not play has no summary (404); an outsider gets 403', async () => {
    expect((await clients.bystander.get(`/courses/${courseId}/debrief/${sessionId}/mine`)).status).toBe(404);
    expect((await clients.instructor.get(`/courses/${courseId}/debrief/${sessionId}/mine`)).status).toBe(404);
    expect((await clients.outsider.get(`/courses/${courseId}/debrief/${sessionId}`)).status).toBe(403);
    expect((await clients.outsider.get(`/courses/${courseId}/debrief/${sessionId}/mine`)).status).toBe(403);
  });

  it('unknown session 404; another course’s session 404 through this course, 403 through its own', async () => {
    expect((await clients.instructor.get(`/courses/${courseId}/debrief/99999999`)).status).toBe(404);
    expect((await clients.instructor.get(`/courses/${courseId}/debrief/abc`)).status).toBe(404);
    expect((await clients.instructor.get(`/courses/${courseId}/debrief/${otherSessionId}`)).status).toBe(404);
    expect((await clients.instructor.get(`/courses/${courseId}/debrief/compare?sessions=${sessionId},${otherSessionId}`)).status).toBe(404);
    expect((await clients.instructor.get(`/courses/${courseId}/debrief/csv/points?sessions=${otherSessionId}`)).status).toBe(404);
    expect((await clients.instructor.get(`/courses/${otherCourseId}/debrief/${otherSessionId}`)).status).toBe(403);
    expect((await clients.instructor.get(`/courses/${courseId}/debrief/compare?sessions=x`)).status).toBe(400);
    expect((await clients.instructor.get(`/courses/${courseId}/debrief/csv/nonsense?sessions=${sessionId}`)).status).toBe(404);
  });
});

async function waitDone(c: Client, id: number): Promise<{ seen: EstimateStatus[]; last: EstimateStatus }> {
  const seen: EstimateStatus[] = [];
  const until = Date.now() + 25_000;
  for (;;) {
    const res = await c.get(`/courses/${courseId}/estimates/${id}`);
    expect(res.status).toBe(200);
    const e = (await res.json()) as EstimateStatus;
    seen.push(e);
    if (e.status === 'done' || e.status === 'failed') return { seen, last: e };
    if (Date.now() > until) throw new Error(`estimate ${id} still ${e.status} at ${e.progress}/${e.total}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('estimation through the real server', () => {
  const form = (extra: Record<string, string | number> = {}) => ({
    sessions: String(sessionId),
    windowKind: 'all',
    preset: 'dbf2011',
    bootstrap: 80,
    seed: 7,
    ...extra,
  });

  it('runs the bootstrap on workers, reports progress to the total, stores the result, and reuses it', async () => {
    const res = await clients.assistant.post(`/courses/${courseId}/estimates`, form());
    expect(res.status).toBe(202);
    const started = (await res.json()) as { ok: true; estimate: EstimateStatus; reused: boolean };
    expect(started.reused).toBe(false);
    const { seen, last } = await waitDone(clients.assistant, started.estimate.id);
    expect(last.status).toBe('done');
    expect(last.error).toBeNull();
    expect([last.progress, last.total]).toEqual([80, 80]);
    // progress only goes up
    for (let i = 1; i < seen.length; i++) expect(seen[i].progress).toBeGreaterThanOrEqual(seen[i - 1].progress);

    const [row] = await testDb().select().from(estimates).where(eq(estimates.id, started.estimate.id));
    expect([row.status, row.progress, row.total, row.courseId]).toEqual(['done', 80, 80, courseId]);
    expect(row.finishedAt).not.toBeNull();
    const result = last.result!;
    expect(result.groups).toHaveLength(1);
    const g = result.groups[0];
    expect(g.strategies).toEqual(['ALLD', 'ALLC', 'Grim', 'TFT', 'WSLS', 'T2']);
    expect(g.shares.reduce((s, x) => s + x, 0)).toBeCloseTo(1, 10);
    expect(g.se).toHaveLength(6);
    for (const se of g.se!) expect(se).toBeGreaterThanOrEqual(0);
    expect(g.subjects).toBe(5);
    expect(g.assigned.reduce((s, x) => s + x, 0)).toBe(5);
    expect(g.expected.reduce((s, x) => s + x, 0)).toBeCloseTo(5, 9);
    expect((row.result as { groups: unknown[] }).groups).toHaveLength(1);

    // The same request (fields in another order, same meaning) is answered from the stored row.
    const before = await testDb().select({ id: estimates.id }).from(estimates).where(eq(estimates.courseId, courseId));
    const again = await clients.researcher.post(`/courses/${courseId}/estimates`, {
      seed: 7,
      bootstrap: 80,
      preset: 'dbf2011',
      windowKind: 'all',
      sessions: `${sessionId},${sessionId}`,
    });
    expect(again.status).toBe(200);
    const reused = (await again.json()) as { ok: true; estimate: EstimateStatus; reused: boolean };
    expect([reused.reused, reused.estimate.id, reused.estimate.status]).toEqual([true, started.estimate.id, 'done']);
    const after = await testDb().select({ id: estimates.id }).from(estimates).where(eq(estimates.courseId, courseId));
    expect(after.length).toBe(before.length);

    // The Debrief opens with the stored result, and its CSV is downloadable.
    const page = await (await clients.instructor.get(`/courses/${courseId}/debrief/${sessionId}`)).text();
    expect(page).toContain(`Estimation #${started.estimate.id}`);
    const csv = await clients.instructor.get(`/courses/${courseId}/debrief/csv/strategies?estimate=${started.estimate.id}`);
    expect(csv.status).toBe(200);
    expect(csv.headers.get('content-type')).toContain('text/csv');
    expect((await csv.text()).trimEnd().split('\n')).toHaveLength(7);
  });

  it('an uploaded dataset with the same rows gives the same estimate', async () => {
    const panel = (await loadSessionPanel(courseId, sessionId))!;
    // the rows the estimation on the session used (own, paid choices, each supergame cut at its first other one)
    const { rows } = estimationRows(panel.rows, 'own');
    const datasetId = await createDataset(courseId, ids.researcher, 'Same rows', rows);
    const res = await clients.researcher.post(`/courses/${courseId}/estimates`, {
      dataset: datasetId,
      windowKind: 'all',
      preset: 'dbf2011',
      bootstrap: 0,
      seed: 7,
    });
    expect(res.status).toBe(202);
    const { estimate } = (await res.json()) as { estimate: EstimateStatus };
    const { last } = await waitDone(clients.researcher, estimate.id);
    expect(last.status).toBe('done');
    expect(last.total).toBe(0);
    const bySession = (
      await testDb()
        .select()
        .from(estimates)
        .where(and(eq(estimates.courseId, courseId), eq(estimates.status, 'done')))
    )
      .map((r) => r.result as { groups: { shares: number[] }[]; bootstrap: number })
      .find((r) => r.bootstrap === 80)!;
    last.result!.groups[0].shares.forEach((s, k) => expect(s).toBeCloseTo(bySession.groups[0].shares[k], 10));
    expect(last.result!.groups[0].se).toBeNull();
  });

  it('bad requests get field errors and store nothing; another course’s data is a 404', async () => {
    const count = async () => (await testDb().select({ id: estimates.id }).from(estimates)).length;
    const before = await count();
    const bad = await clients.instructor.post(
      `/courses/${courseId}/estimates`,
      form({ bootstrap: 'many', windowKind: 'supergames', from: 5, to: 2 }),
    );
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { errors: Record<string, string> }).errors).toMatchObject({ bootstrap: 'B must be a whole number' });
    const badWindow = await clients.instructor.post(`/courses/${courseId}/estimates`, form({ windowKind: 'supergames', from: 5, to: 2 }));
    expect(((await badWindow.json()) as { errors: Record<string, string> }).errors).toEqual({
      to: 'The last supergame must not come before the first',
    });
    const noStrategy = await clients.instructor.post(`/courses/${courseId}/estimates`, form({ preset: 'custom' }));
    expect(((await noStrategy.json()) as { errors: Record<string, string> }).errors).toEqual({ strategy: 'Choose at least one strategy' });
    const tooMany = await clients.instructor.post(`/courses/${courseId}/estimates`, form({ bootstrap: 5000 }));
    expect(tooMany.status).toBe(400);
    const foreign = await clients.instructor.post(`/courses/${courseId}/estimates`, form({ sessions: String(otherSessionId) }));
    expect(foreign.status).toBe(404);
    expect(await count()).toBe(before);
    expect((await clients.instructor.get(`/courses/${courseId}/estimates/99999999`)).status).toBe(404);
  });
});

describe('realised lengths of the demo’s simulated sessions against the geometric law', () => {
  it('δ = 1/2: the Debrief’s χ² equals Pearson’s χ² recomputed here with jStat’s p-value; δ = 7/8: a simulated p-value', async () => {
    const [demo] = await testDb().select({ id: courses.id }).from(courses).where(eq(courses.isDemo, true));
    const demoSessions = await testDb()
      .select()
      .from(sessions)
      .where(and(eq(sessions.courseId, demo.id), eq(sessions.simulated, true)));
    const admin = await signIn('admin@halvorsen.example');
    for (const s of demoSessions) {
      const delta = (s.params as { delta: number }).delta;
      const lengths = (await testDb().select().from(supergameDraws).where(eq(supergameDraws.sessionId, s.id))).map((d) => d.length);
      const page = await (await admin.get(`/courses/${demo.id}/debrief/${s.id}`)).text();
      if (delta === 0.875) {
        // 8 supergames: n(1−δ) = 1 < 5 already for L = 1, so no two bins reach expected counts of 5:
        // the p-value is simulated (9,999 seeded samples of 8 geometric lengths).
        expect(lengths).toHaveLength(8);
        expect(page.replaceAll('<!-- -->', '')).toMatch(
          new RegExp(`#${s.id}: χ² = [0-9.]+, simulated p = [0-9.]+ from 9,999 seeded samples`),
        );
        continue;
      }
      expect(delta).toBe(0.5);
      expect(lengths).toHaveLength(20);
      // Source: methods.md §2 — P(L = k) = (1−δ)δ^(k−1), tail pooled so every expected count is ≥ 5,
      // δ known (df = bins − 1). n = 20, δ = 1/2: expected 10 for L = 1, 5 for L = 2 (pooled tail
      // "2+" has 20·δ = 10), so the bins are 1 and 2+. p-value from jStat (jStat.chisquare.cdf),
      // an independent implementation of the χ² distribution.
      const n = lengths.length;
      const o1 = lengths.filter((l) => l === 1).length;
      const stat = (o1 - n / 2) ** 2 / (n / 2) + (n - o1 - n / 2) ** 2 / (n / 2);
      const p = 1 - jstat.jStat.chisquare.cdf(stat, 1);
      const panel = (await loadSessionPanel(demo.id, s.id))!;
      const fit = sessionDebrief(panel.rows, { payoffs: { R: 40, S: 12, T: 50, P: 25 }, delta }).lengths.test;
      if (!fit.ok) throw new Error(fit.message);
      expect(fit.result.bins.map((b) => [b.from, b.to, b.observed, b.expected])).toEqual([
        [1, 1, o1, 10],
        [2, null, n - o1, 10],
      ]);
      expect(fit.result.statistic).toBeCloseTo(stat, 12);
      expect(fit.result.df).toBe(1);
      expect(fit.result.pValue).toBeCloseTo(p, 10);
      expect(page).toContain(`#${s.id}: χ² = ${stat.toFixed(3)}, df = 1, p = ${p.toFixed(3)}`);
    }
  });
});
