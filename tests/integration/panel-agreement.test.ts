// One choice panel: the paged reader (app/models/panel-export.server.ts) that the Debrief, the
// estimation, the downloads and the API use must give, row for row and in the same order, what the
// pure rule (app/lib/choice-panel.ts) makes of the session's raw tables held in memory — on the
// demo session and on a 1,001-participant session with declined consent, a hand-over, unpaid
// rounds after a block's end and rounds cut by "End now".
import { and, eq, inArray } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { estimationRows, type PanelRow, sessionPanel, type StoredSession } from '#app/lib/choice-panel';
import { designSchema } from '#app/lib/design';
import { loadDebrief } from '#app/models/debrief.server';
import { panelCsvPieces, panelPage, panelPages, panelSessions, type PanelCursor } from '#app/models/panel-export.server';
import { loadSessionPanel } from '#app/models/panel.server';
import { closeDb } from '#app/utils/db.server';
import { choices, courses, sessionParticipants, sessions, supergameDraws } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { uniqueEmail } from '#tests/helpers/http';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

/** The session's raw tables, read without the reader. */
async function stored(sessionId: number): Promise<StoredSession> {
  const [s] = await testDb().select().from(sessions).where(eq(sessions.id, sessionId));
  const design = designSchema.parse(s.params);
  return {
    session: { id: s.id, treatment: s.treatment, payoffs: design.payoffs, delta: design.delta },
    participants: await testDb()
      .select({
        participantKey: sessionParticipants.participantKey,
        pseudonym: sessionParticipants.pseudonym,
        consent: sessionParticipants.consent,
      })
      .from(sessionParticipants)
      .where(eq(sessionParticipants.sessionId, sessionId)),
    choices: await testDb()
      .select({
        supergame: choices.supergame,
        round: choices.round,
        pairId: choices.pairId,
        seat: choices.seat,
        participantKey: choices.participantKey,
        action: choices.action,
        source: choices.source,
        strategy: choices.strategy,
        decisionMs: choices.decisionMs,
        atMs: choices.atMs,
      })
      .from(choices)
      .where(eq(choices.sessionId, sessionId)),
    draws: await testDb()
      .select({ supergame: supergameDraws.supergame, draws: supergameDraws.draws, length: supergameDraws.length })
      .from(supergameDraws)
      .where(eq(supergameDraws.sessionId, sessionId)),
  };
}

async function readAll(courseId: number, sessionId: number, opts: { keepDeclined?: boolean; pageSize?: number } = {}) {
  const rows: PanelRow[] = [];
  let unfinished = 0;
  for await (const page of panelPages(await panelSessions(courseId, [sessionId]), opts)) {
    rows.push(...page.rows);
    unfinished += page.unfinished.length;
  }
  return { rows, unfinished };
}

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

it('the demo session: the reader and the pure rule agree row for row', async () => {
  const [demo] = await testDb().select({ id: courses.id }).from(courses).where(eq(courses.isDemo, true));
  const [s] = await testDb()
    .select({ id: sessions.id })
    .from(sessions)
    .where(and(eq(sessions.courseId, demo.id), eq(sessions.simulated, true)));
  const pure = sessionPanel(await stored(s.id));
  expect(pure.rows.length).toBeGreaterThan(100);
  // pages of two rows: every page boundary inside a participant's supergames is crossed
  expect((await readAll(demo.id, s.id, { pageSize: 2 })).rows).toEqual(pure.rows);
  expect((await loadSessionPanel(demo.id, s.id))!.rows).toEqual(pure.rows);
});

describe('a session of 1,001 participants with every kind of row', () => {
  const N = 1001;
  let courseId: number;
  let sessionId: number;
  let remove: () => Promise<void>;
  let handedKey: string;

  beforeAll(async () => {
    const instructor = await createUser(uniqueEmail('agree-inst'));
    courseId = await createCourse('Agreement course', [{ userId: instructor, role: 'instructor' }]);
    // three supergames of 2, 1 and 2 rounds; every seventh participant declined research consent
    const syn = await insertSyntheticSession(testDb(), {
      courseId,
      createdBy: instructor,
      participants: N,
      lengths: [2, 1, 2],
      consent: (i) => (i % 7 === 3 ? 0 : i % 2 ? 1 : null),
      seed: 11,
    });
    sessionId = syn.sessionId;
    remove = syn.remove;
    // block termination: supergame 1 really ended after round 1, its second round was played unpaid
    await testDb()
      .update(supergameDraws)
      .set({ length: 1 })
      .where(and(eq(supergameDraws.sessionId, sessionId), eq(supergameDraws.supergame, 1)));
    // a hand-over: P-001 is played by a computer (TFT) from round 2 of supergame 3
    const [p1] = await testDb()
      .select()
      .from(sessionParticipants)
      .where(and(eq(sessionParticipants.sessionId, sessionId), eq(sessionParticipants.pseudonym, 'P-001')));
    handedKey = p1.participantKey;
    await testDb()
      .update(choices)
      .set({ source: 'computer', strategy: 'TFT' })
      .where(and(eq(choices.sessionId, sessionId), eq(choices.participantKey, handedKey), eq(choices.supergame, 3), eq(choices.round, 2)));
    // "End now" in the middle of supergame 3, round 2: ten pairs' second seats never chose
    const cut = await testDb()
      .select({ id: choices.id })
      .from(choices)
      .where(and(eq(choices.sessionId, sessionId), eq(choices.supergame, 3), eq(choices.round, 2), eq(choices.seat, 1)))
      .limit(10);
    await testDb()
      .delete(choices)
      .where(
        inArray(
          choices.id,
          cut.map((c) => c.id),
        ),
      );
    await testDb().update(sessions).set({ status: 'complete' }).where(eq(sessions.id, sessionId));
  }, 120_000);

  afterAll(async () => {
    await remove?.();
  });

  it('the reader, page by page, equals the pure rule: de-identified, and kept whole for the class’s own view', async () => {
    const raw = await stored(sessionId);
    for (const keepDeclined of [false, true]) {
      const pure = sessionPanel(raw, { keepDeclined });
      const read = await readAll(courseId, sessionId, { keepDeclined });
      expect(read.rows.length).toBe(pure.rows.length);
      expect(read.rows).toEqual(pure.rows);
      expect(read.unfinished).toBe(pure.unfinished.length);
    }
    const { rows, unfinished } = sessionPanel(raw);
    // what the session holds, counted independently of both
    const declined = raw.participants.filter((p) => p.consent === 0).map((p) => p.pseudonym);
    expect(declined.length).toBe(143);
    expect(rows.some((r) => declined.includes(r.pseudonym))).toBe(false);
    // ten seats cut by "End now": their partners' choices are half-finished rounds (fewer when
    // such a partner declined research consent and is not read at all)
    expect(sessionPanel(raw, { keepDeclined: true }).unfinished).toHaveLength(10);
    expect(unfinished.length).toBeLessThanOrEqual(10);
    expect(rows.filter((r) => r.origin === 'unpaid_round').length).toBe(N - declined.length);
    expect(rows.find((r) => r.pseudonym === 'P-001' && r.supergame === 3 && r.round === 2)?.origin ?? 'cut').toMatch(
      /^(computer_seat|cut)$/,
    );
    // numeric order: P-999, P-1000, P-1001 at the end (a text sort puts P-1000 before P-101)
    const order = [...new Set(rows.map((r) => r.pseudonym))];
    expect(order.slice(-3)).toEqual(['P-999', 'P-1000', 'P-1001'].filter((p) => !declined.includes(p)));
    expect(order.indexOf('P-101')).toBeLessThan(order.indexOf('P-1000'));
  }, 120_000);

  it('the API’s cursor pages, the CSV download and the Debrief read the same rows', async () => {
    const list = await panelSessions(courseId, [sessionId]);
    const pure = sessionPanel(await stored(sessionId)).rows;
    const paged: PanelRow[] = [];
    let after: PanelCursor | null = null;
    do {
      const page: { rows: PanelRow[]; next: PanelCursor | null } = await panelPage(list, 1000, after);
      paged.push(...page.rows);
      after = page.next;
    } while (after);
    expect(paged).toEqual(pure);

    let csv = '';
    for await (const piece of panelCsvPieces(list)) csv += piece;
    expect(csv.trimEnd().split('\n')).toHaveLength(pure.length + 1);

    const research = (await loadDebrief(courseId, [sessionId], { research: true }))!;
    const own = pure.filter((r) => r.origin === 'own');
    expect(research.sessions[0].debrief.counts).toEqual({
      used: own.length,
      timeout: pure.filter((r) => r.origin === 'timeout').length,
      computer_seat: pure.filter((r) => r.origin === 'computer_seat').length,
      unpaid_round: pure.filter((r) => r.origin === 'unpaid_round').length,
    });
    expect(research.sessions[0].unfinished).toBe(sessionPanel(await stored(sessionId)).unfinished.length);
    // the class's own view keeps those who declined; downloads and estimation do not
    const page = (await loadDebrief(courseId, [sessionId]))!;
    expect(page.sessions[0].debrief.participants).toBe(N);
    expect(research.sessions[0].debrief.participants).toBe(N - 143);
    const est = estimationRows((await loadSessionPanel(courseId, sessionId))!.rows, 'own');
    expect(new Set(est.rows.map((r) => r.subject)).size).toBeLessThanOrEqual(N - 143);
    const ownKeys = new Set(own.map((o) => `${o.pseudonym}/${o.supergame}/${o.round}`));
    expect(est.rows.every((r) => ownKeys.has(`${r.subject}/${r.supergame}/${r.round}`))).toBe(true);
  }, 120_000);
});
