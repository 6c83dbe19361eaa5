import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DATASET_LIMITS, datasetChoiceRows } from '#app/models/datasets.server';
import { closeDb } from '#app/utils/db.server';
import { datasets } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, pageText as text, signIn, uniqueEmail } from '#tests/helpers/http';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

function upload(client: Client, courseId: number, name: string, csv: string, fields: Record<string, string> = {}) {
  const form = new FormData();
  form.set('intent', 'upload');
  form.set('file', new File([csv], name, { type: 'text/csv' }));
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  return client.postForm(`/courses/${courseId}/datasets`, form);
}

const stored = (courseId: number) => testDb().select().from(datasets).where(eq(datasets.courseId, courseId));

let researcher: Client;
let assistant: Client;
let courseId: number;
let session: Awaited<ReturnType<typeof insertSyntheticSession>>;

beforeAll(async () => {
  const re = uniqueEmail('res');
  const ta = uniqueEmail('ta');
  const i = await createUser(uniqueEmail('instr'));
  courseId = await createCourse('Dataset course', [
    { userId: i, role: 'instructor' },
    { userId: await createUser(re), role: 'researcher' },
    { userId: await createUser(ta), role: 'assistant' },
  ]);
  session = await insertSyntheticSession(testDb(), { courseId, createdBy: i, participants: 4, lengths: [2, 3], seed: 41 });
  [researcher, assistant] = await Promise.all([signIn(re), signIn(ta)]);
});

afterAll(async () => {
  await session?.remove();
  await closeTestDb();
  await closeDb();
});

describe('external panel upload', () => {
  it('stores a panel in Parley’s own export format as a dataset for estimation', async () => {
    const csv = await (await researcher.get(`/courses/${courseId}/data/panel?session=${session.sessionId}&format=csv`)).text();
    const res = await upload(researcher, courseId, 'lab-session.csv', csv, { name: 'Lab session, spring' });
    expect(res.status).toBe(200);
    expect(text(await res.text())).toContain('“Lab session, spring” stored: 20 choices of 4 participants');
    const [d] = await stored(courseId);
    expect(d).toMatchObject({ name: 'Lab session, spring', rowCount: 20 });
    expect((await datasetChoiceRows(courseId, d.id))![0]).toEqual({
      session: String(session.sessionId),
      treatment: 'Synthetic δ = 0.75 (simulated)',
      subject: 'P-001',
      partner: expect.stringMatching(/^P-00\d$/),
      supergame: 1,
      round: 1,
      action: expect.stringMatching(/^[CD]$/),
      partnerAction: expect.stringMatching(/^[CD]$/),
    });
    // The dataset's own estimation page (same request, workers and storage as the Debrief's).
    const page = await researcher.get(`/courses/${courseId}/datasets/${d.id}/estimate`);
    expect(page.status).toBe(200);
    expect(text(await page.text())).toContain('Strategy-frequency estimation');
    expect((await assistant.get(`/courses/${courseId}/datasets/${d.id}/estimate`)).status).toBe(403);
    expect((await researcher.get(`/courses/${courseId}/datasets/99999999/estimate`)).status).toBe(404);
  });

  it('asks for a column mapping when the names differ, then stores with it', async () => {
    const csv =
      'sid,cond,subj,opp,match,period,coop,opp_coop\nA,T1,s1,s2,1,1,1,0\nA,T1,s2,s1,1,1,0,1\nA,T1,s1,s2,1,2,0,0\nA,T1,s2,s1,1,2,0,0\n';
    const first = await upload(researcher, courseId, 'other-lab.csv', csv);
    expect(first.status).toBe(400);
    const page = text(await first.text());
    expect(page).toContain('Which column holds what?');
    expect(page).toContain('“Session”, “Treatment”, “Participant (pseudonym)”');
    const before = (await stored(courseId)).length;
    const map = {
      map_session: 'sid',
      map_treatment: 'cond',
      map_subject: 'subj',
      map_partner: 'opp',
      map_supergame: 'match',
      map_round: 'period',
      map_action: 'coop',
      map_partnerAction: 'opp_coop',
    };
    const second = await upload(researcher, courseId, 'other-lab.csv', csv, map);
    expect(second.status).toBe(200);
    const all = await stored(courseId);
    expect(all).toHaveLength(before + 1);
    expect(all.at(-1)).toMatchObject({ name: 'other-lab', rowCount: 4 });
  });

  it('refuses a file with bad lines, naming each, and stores nothing', async () => {
    const before = (await stored(courseId)).length;
    const csv = [
      'session,treatment,pseudonym,partner,supergame,round,action,partner_action',
      'S1,T,P-1,P-2,1,1,C,C',
      'S1,T,P-2,P-1,1,1,C,maybe',
      'S1,T,P-1,P-2,1,3,C,C',
      'S1,T,P-2,P-1,x,2,C,C',
    ].join('\n');
    const res = await upload(researcher, courseId, 'bad.csv', csv);
    expect(res.status).toBe(400);
    const page = text(await res.text());
    expect(page).toContain('3 problems in bad.csv: nothing was stored');
    expect(page).toContain('Line 3: partner_action: must be C or D (or 1 = cooperate, 0 = defect) (got "maybe")');
    expect(page).toContain('Line 4: session S1, subject P-1, supergame 1: round 2 is missing');
    expect(page).toContain('Line 5: supergame: must be a whole number ≥ 1 (got "x")');
    expect(await stored(courseId)).toHaveLength(before);
  });

  it('caps the size and the row count with a clear message, and is not for assistants', async () => {
    const header = 'session,treatment,pseudonym,partner,supergame,round,action,partner_action\n';
    const rows = Array.from(
      { length: DATASET_LIMITS.maxRows + 1 },
      (_, k) => `S,T,P${k % 2},P${(k + 1) % 2},${1 + Math.floor(k / 2)},1,C,C`,
    ).join('\n');
    const many = await upload(researcher, courseId, 'many.csv', header + rows);
    expect(many.status).toBe(413);
    expect(text(await many.text())).toContain(`more than ${DATASET_LIMITS.maxRows.toLocaleString('en-GB')} rows`);
    const big = await upload(researcher, courseId, 'big.csv', header + 'x'.repeat(DATASET_LIMITS.maxBytes));
    expect(big.status).toBe(413);
    expect(text(await big.text())).toContain(`larger than ${DATASET_LIMITS.maxBytes / 1024 / 1024} MB`);
    expect((await assistant.get(`/courses/${courseId}/datasets`)).status).toBe(403);
    expect((await upload(assistant, courseId, 'x.csv', header)).status).toBe(403);
  });
});
