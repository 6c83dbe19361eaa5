// Issue 9, finding 12 (second half): one estimation queue for all courses and no cap per user,
// so one person could fill the machine's queue. Each user may have at most ESTIMATES_PER_USER
// (default 3) estimations queued or running; one more is refused with a 429 and nothing stored.
// (The queue's fairness between courses: tests/integration/jobs.test.ts.)
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { EstimateStatus } from '#app/models/estimate.server';
import { closeDb } from '#app/utils/db.server';
import { estimates } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { simulatedDataset, waitEstimate } from '#tests/helpers/estimates';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';

const CAP = Number(process.env.ESTIMATES_PER_USER ?? 3);

let first: Client;
let second: Client;
let third: Client;
let thirdId: number;
let courseId: number;
let datasetId: number;

beforeAll(async () => {
  const a = uniqueEmail('res-a');
  const b = uniqueEmail('res-b');
  const c = uniqueEmail('res-c');
  const aId = await createUser(a);
  thirdId = await createUser(c);
  courseId = await createCourse('Estimation cap course', [
    { userId: await createUser(uniqueEmail('instr')), role: 'instructor' },
    { userId: aId, role: 'researcher' },
    { userId: await createUser(b), role: 'researcher' },
    { userId: thirdId, role: 'researcher' },
  ]);
  // 400 simulated subjects: a bootstrap of 2,000 replicates keeps the first job busy for a while
  datasetId = await simulatedDataset(courseId, aId, 'Simulated (cap test)', { subjects: 400, supergames: 10, seed: 12 });
  [first, second, third] = await Promise.all([signIn(a), signIn(b), signIn(c)]);
});

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

const ask = (c: Client, seed: number, bootstrap: number) =>
  c.post(`/courses/${courseId}/estimates`, { dataset: datasetId, windowKind: 'all', preset: 'dbf2011', bootstrap, seed });
const rowsOfCourse = async () =>
  (await testDb().select({ id: estimates.id }).from(estimates).where(eq(estimates.courseId, courseId))).length;

const waitDone = (c: Client, id: number) => waitEstimate(c, courseId, id);

describe('estimations per user', () => {
  it(`a user with ${CAP} queued or running gets a 429 for one more, and nothing is stored`, { timeout: 120_000 }, async () => {
    const started: number[] = [];
    for (let k = 0; k < CAP; k++) {
      // the first runs long; the others wait behind it in the queue
      const res = await ask(first, 100 + k, k === 0 ? 2000 : 0);
      expect(res.status).toBe(202);
      started.push(((await res.json()) as { estimate: EstimateStatus }).estimate.id);
    }
    const before = await rowsOfCourse();
    const refused = await ask(first, 999, 0);
    expect(refused.status).toBe(429);
    const body = (await refused.json()) as { ok: boolean; code: string; message: string };
    expect(body).toMatchObject({ ok: false, code: 'too_many_estimations' });
    expect(body.message).toContain(`${CAP} estimations`);
    expect(await rowsOfCourse()).toBe(before);

    // the cap is per user: another researcher of the same course may start one
    const other = await ask(second, 999, 0);
    expect(other.status).toBe(202);
    const otherId = ((await other.json()) as { estimate: EstimateStatus }).estimate.id;

    // requests at once cannot all take the last places: of CAP + 2 sent together (queued behind
    // the long one, so none can finish meanwhile) exactly CAP are accepted
    const burst = await Promise.all(Array.from({ length: CAP + 2 }, (_, k) => ask(third, 500 + k, 0)));
    expect(burst.map((r) => r.status).sort()).toEqual([...Array<number>(CAP).fill(202), 429, 429]);
    const thirds = await testDb().select({ id: estimates.id }).from(estimates).where(eq(estimates.createdBy, thirdId));
    expect(thirds).toHaveLength(CAP);

    // asking again for a stored request is answered from it, cap or not
    const again = await ask(first, 100, 2000);
    expect(again.status).toBe(200);
    expect(((await again.json()) as { reused: boolean }).reused).toBe(true);

    // once they have finished, the first user may start more
    for (const id of started) expect((await waitDone(first, id)).status).toBe('done');
    await waitDone(second, otherId);
    for (const { id } of thirds) await waitEstimate(third, courseId, id);
    const later = await ask(first, 998, 0);
    expect(later.status).toBe(202);
    await waitDone(first, ((await later.json()) as { estimate: EstimateStatus }).estimate.id);
  });
});
