// The jobs queue in MariaDB (app/jobs): leases, fairness between courses, zod at the door, and the
// app's own jobs run by the test server (estimations it finds held by a dead process, the hourly
// pruning of sign-in records). Test kinds carry a per-run suffix: the test server never takes them.
import { and, eq, inArray } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { PRUNE_KEY } from '#app/jobs/all.server';
import { defineJob, enqueue, type JobKind, JobWorker } from '#app/jobs/queue.server';
import { STRATEGY_SETS } from '#app/lib/automata';
import { estimateJob, getEstimate, requestKey } from '#app/models/estimate.server';
import { closeDb } from '#app/utils/db.server';
import { canonicalRequest } from '#app/utils/estimate-form';
import { authEvents, estimates, jobs } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { simulatedDataset } from '#tests/helpers/estimates';
import { uniqueEmail } from '#tests/helpers/http';

const run = Date.now().toString(36);
const payload = z.object({ n: z.number().int() });
let courseA: number;
let courseB: number;
let researcher: number;
const workers: JobWorker[] = [];

const worker = (kind: JobKind<{ n: number }>, owner: string, leaseMs = 60_000) => {
  const w = new JobWorker([kind], { owner, leaseMs });
  workers.push(w);
  return w;
};
const rowsOf = (kind: string) => testDb().select().from(jobs).where(eq(jobs.kind, kind)).orderBy(jobs.id);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
/** A promise the test resolves when it chooses. */
function gate() {
  let open: (() => void) | undefined;
  const shut = new Promise<void>((r) => (open = r));
  return { shut, open: () => open?.() };
}

async function until<T>(what: string, probe: () => Promise<T | undefined | null | false>, timeoutMs = 20_000): Promise<T> {
  for (const end = Date.now() + timeoutMs; ; await sleep(100)) {
    const v = await probe();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
  }
}

beforeAll(async () => {
  researcher = await createUser(uniqueEmail('jobs-res'));
  courseA = await createCourse(`Jobs course A ${run}`, [{ userId: researcher, role: 'researcher' }]);
  courseB = await createCourse(`Jobs course B ${run}`, [{ userId: researcher, role: 'researcher' }]);
});

afterAll(async () => {
  for (const w of workers) await w.stop();
  await testDb()
    .delete(jobs)
    .where(inArray(jobs.courseId, [courseA, courseB]));
  await closeTestDb();
  await closeDb();
});

describe('the jobs queue', () => {
  it('refuses a payload its kind’s zod schema does not accept, and stores nothing', async () => {
    const kind = defineJob({ kind: `test-zod-${run}`, payload, concurrency: 1, run: async () => undefined });
    await expect(enqueue(kind, { n: 'seven' } as never)).rejects.toThrow(z.ZodError);
    expect(await rowsOf(kind.kind)).toHaveLength(0);

    // a row that got into the table some other way is refused when taken, and never run
    const ran: number[] = [];
    await testDb()
      .insert(jobs)
      .values({ kind: kind.kind, courseId: courseA, payload: { n: 'seven' }, runAfter: new Date() });
    const w = worker({ ...kind, run: async ({ n }) => void ran.push(n) }, `test-zod-${run}`);
    w.kick();
    await w.idle();
    const [row] = await rowsOf(kind.kind);
    expect(row).toMatchObject({ state: 'failed', activeKey: null });
    expect(row.error).toMatch(/^The job's payload was refused: /);
    expect(ran).toEqual([]);
  });

  it('takes turns between courses: one course’s batch does not hold up another’s', async () => {
    const order: string[] = [];
    const kind = defineJob({ kind: `test-fair-${run}`, payload, concurrency: 1, run: async () => undefined });
    for (const n of [1, 2, 3]) await enqueue(kind, { n }, { courseId: courseA });
    await enqueue(kind, { n: 1 }, { courseId: courseB });
    const w = worker(
      {
        ...kind,
        run: async ({ n }, job) => {
          const [row] = await testDb().select({ courseId: jobs.courseId }).from(jobs).where(eq(jobs.id, job.id));
          order.push(`${row.courseId === courseA ? 'A' : 'B'}${n}`);
        },
      },
      `test-fair-${run}`,
    );
    w.kick();
    await w.idle();
    // A's first (queued first), then B's (never served), then the rest of A's
    expect(order).toEqual(['A1', 'B1', 'A2', 'A3']);
    expect((await rowsOf(kind.kind)).map((r) => r.state)).toEqual(['done', 'done', 'done', 'done']);
  });

  it('a job held by a process that died is taken again once its lease runs out, and finished once', async () => {
    const kind = defineJob({ kind: `test-lease-${run}`, payload, concurrency: 1, run: async () => undefined });
    await enqueue(kind, { n: 5 }, { courseId: courseA, key: `test-lease-${run}` });
    const attempts: string[] = [];
    const blocked = gate();
    // the first process takes it and then hangs (as good as dead: it renews nothing from now on)
    const first = worker(
      {
        ...kind,
        run: async () => {
          attempts.push('first');
          await blocked.shut;
        },
      },
      `test-lease-first-${run}`,
      400,
    );
    first.kick();
    await until('the first process to hold the job', async () => (await rowsOf(kind.kind))[0]?.state === 'running');
    await first.stop();
    const [held] = await rowsOf(kind.kind);
    expect(held).toMatchObject({ state: 'running', attempts: 1, leaseOwner: `test-lease-first-${run}` });

    const second = worker({ ...kind, run: async ({ n }) => void attempts.push(`second:${n}`) }, `test-lease-second-${run}`, 400);
    // while the lease holds, nobody else takes it
    second.kick();
    await second.idle();
    expect(attempts).toEqual(['first']);
    await sleep(450);
    second.kick();
    await second.idle();
    expect(attempts).toEqual(['first', 'second:5']);
    const [done] = await rowsOf(kind.kind);
    expect(done).toMatchObject({ state: 'done', attempts: 2, leaseOwner: null, activeKey: null });

    // the first process waking up late changes nothing: the job is no longer its own
    blocked.open();
    await first.idle();
    expect((await rowsOf(kind.kind))[0]).toMatchObject({ state: 'done', attempts: 2 });
  });

  it('one job per key; asked again while it runs, it runs once more', async () => {
    const kind = defineJob({ kind: `test-again-${run}`, payload, concurrency: 1, run: async () => undefined });
    const key = `test-again-${run}`;
    const ran: number[] = [];
    const release = gate();
    const w = worker(
      {
        ...kind,
        run: async ({ n }) => {
          ran.push(n);
          if (ran.length === 1) await release.shut;
        },
      },
      key,
    );
    await enqueue(kind, { n: 1 }, { courseId: courseA, key });
    await enqueue(kind, { n: 2 }, { courseId: courseA, key });
    expect(await rowsOf(kind.kind)).toHaveLength(1);
    w.kick();
    await until('the job to run', async () => ran.length === 1);
    await enqueue(kind, { n: 3 }, { courseId: courseA, key, again: true });
    release.open();
    await until('the second pass', async () => ran.length === 2);
    await w.idle();
    // the same job (its first payload) ran twice; then the key is free for a new one
    expect(ran).toEqual([1, 1]);
    expect(await rowsOf(kind.kind)).toMatchObject([{ state: 'done', activeKey: null, again: false }]);
    await enqueue(kind, { n: 4 }, { courseId: courseA, key });
    expect(await rowsOf(kind.kind)).toHaveLength(2);
    w.kick();
    await w.idle();
    expect(ran).toEqual([1, 1, 4]);
  });
});

describe('the app’s jobs on the test server', () => {
  async function queuedEstimate(seed: number) {
    const datasetId = await simulatedDataset(courseB, researcher, `Simulated (jobs test ${seed})`, { subjects: 20, supergames: 4, seed });
    const request = canonicalRequest({
      source: { kind: 'dataset', datasetId },
      window: 'all',
      strategies: STRATEGY_SETS.dbf2011.slice(),
      bootstrap: 0,
      seed,
    });
    const [res] = await testDb()
      .insert(estimates)
      .values({ courseId: courseB, request, requestKey: requestKey(request), status: 'queued', total: 0, createdBy: researcher });
    return res.insertId;
  }

  it('an estimation whose process died mid-run is finished by another; reading it starts nothing', async () => {
    const id = await queuedEstimate(41);
    // a read is a read: no job appears for a queued row nobody queued
    expect((await getEstimate(courseB, id))?.status).toBe('queued');
    expect(
      await testDb()
        .select()
        .from(jobs)
        .where(eq(jobs.activeKey, `estimate:${id}`)),
    ).toHaveLength(0);

    // as a dead process leaves it: the row running, the job leased to it, the lease run out
    await testDb().update(estimates).set({ status: 'running' }).where(eq(estimates.id, id));
    await testDb()
      .insert(jobs)
      .values({
        kind: estimateJob.kind,
        courseId: courseB,
        payload: { estimateId: id },
        state: 'running',
        activeKey: `estimate:${id}`,
        attempts: 1,
        leaseOwner: 'a-dead-process',
        leaseUntil: new Date(Date.now() - 1000),
        startedAt: new Date(Date.now() - 61_000),
      });
    const done = await until('the estimation to finish', async () => {
      const e = await getEstimate(courseB, id);
      return e?.status === 'done' || e?.status === 'failed' ? e : null;
    });
    expect(done.status).toBe('done');
    expect(done.result?.groups[0].subjects).toBe(20);
    const [job] = await testDb()
      .select()
      .from(jobs)
      .where(and(eq(jobs.kind, estimateJob.kind), eq(jobs.courseId, courseB)));
    expect(job).toMatchObject({ state: 'done', attempts: 2, leaseOwner: null, activeKey: null });
  });

  it('a restarted process queues the estimations left without a job, and the server runs them', async () => {
    const id = await queuedEstimate(42);
    expect(await estimateJob.recover!()).toBeGreaterThanOrEqual(1);
    const done = await until('the estimation to finish', async () => {
      const e = await getEstimate(courseB, id);
      return e?.status === 'done' || e?.status === 'failed' ? e : null;
    });
    expect(done.status).toBe('done');
  });

  it('prunes sign-in events every hour: those older than a day go, recent ones stay', async () => {
    const email = uniqueEmail('prune');
    await testDb()
      .insert(authEvents)
      .values([
        { kind: 'code-failure', email, ip: 'old', createdAt: new Date(Date.now() - 25 * 3600_000) },
        { kind: 'code-failure', email, ip: 'recent', createdAt: new Date(Date.now() - 23 * 3600_000) },
      ]);
    // the server queued the site's prune job when it started; make it due now
    const [scheduled] = await testDb().select().from(jobs).where(eq(jobs.activeKey, PRUNE_KEY));
    expect(scheduled).toBeDefined();
    await testDb().update(jobs).set({ runAfter: new Date() }).where(eq(jobs.id, scheduled.id));
    await until('the old event to go', async () => {
      const left = await testDb().select({ ip: authEvents.ip }).from(authEvents).where(eq(authEvents.email, email));
      return left.length === 1;
    });
    expect((await testDb().select({ ip: authEvents.ip }).from(authEvents).where(eq(authEvents.email, email))).map((r) => r.ip)).toEqual([
      'recent',
    ]);
    // …and it is queued again for an hour later
    const [next] = await until('the prune job to be queued again', async () => {
      const r = await testDb().select().from(jobs).where(eq(jobs.id, scheduled.id));
      return r[0]?.state === 'queued' && r[0].runAfter.getTime() > Date.now() + 50 * 60_000 ? r : null;
    });
    expect(next.activeKey).toBe(PRUNE_KEY);
  });
});
