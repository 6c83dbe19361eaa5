// Background work queued in MariaDB (the `jobs` table; docs/decisions/031): estimations, results
// e-mails, pruning. Each kind of job names a zod schema for its payload (checked when queued and
// again when taken), what running it does, and how many may run at once in one process.
//
// A worker takes a ready job with a conditional UPDATE that writes its lease (owner, expiry); only
// one process's UPDATE can match, so several processes share the queue. The worker renews the
// leases of the jobs it runs; a job whose lease ran out (its process died) is ready again and is
// taken by whichever process asks next, a restarted one included. Between courses the next job is
// the one of the course served least recently, so one course's batch does not hold up another's.
import { randomBytes } from 'node:crypto';
import { hostname } from 'node:os';
import { and, eq, inArray, lt, lte, or, sql } from 'drizzle-orm';
import type { z } from 'zod';
import { db, type Db } from '#app/utils/db.server';
import { forget, remember, remembered } from '#app/utils/remember.server';
import { jobs } from '#drizzle/schema';

export interface JobKind<P> {
  /** stored in jobs.kind (at most 40 characters) */
  kind: string;
  payload: z.ZodType<P>;
  /** at most this many jobs of this kind run at once in one process */
  concurrency: number;
  /** a job is given up once taken this many times (its process died each time); default 3 */
  maxAttempts?: number;
  /** periodic: queued again this many ms after each run (queue it once, with a key) */
  everyMs?: number;
  run(payload: P, job: { id: number; attempts: number }): Promise<void>;
  /** the job failed (it threw, or was given up): say so where the pages look */
  failed?(payload: P, message: string): Promise<void>;
  /** when a worker starts: queue what an older process left without a job (idempotent) */
  recover?(): Promise<number>;
}

export const defineJob = <P>(kind: JobKind<P>): JobKind<P> => kind;

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

export interface EnqueueOptions {
  /** whose turn it is (null: the site's own jobs) */
  courseId?: number | null;
  /** at most one job per key is queued or running: queueing it again changes nothing… */
  key?: string;
  /** …unless `again`: a running job with this key then runs once more when it ends */
  again?: boolean;
  runAfter?: Date;
  /** queue inside this transaction (the job exists exactly when the caller's rows do) */
  tx?: Tx;
}

/** Queues a job; throws zod's error, and stores nothing, when the payload is not the kind's. */
export async function enqueue<P>(kind: JobKind<P>, payload: P, opts: EnqueueOptions = {}): Promise<void> {
  const checked = kind.payload.parse(payload);
  await (opts.tx ?? db())
    .insert(jobs)
    .values({
      kind: kind.kind,
      courseId: opts.courseId ?? null,
      payload: checked,
      activeKey: opts.key ?? null,
      runAfter: opts.runAfter ?? new Date(),
    })
    .onDuplicateKeyUpdate({ set: opts.again ? { again: true } : { id: sql`${jobs.id}` } });
  if (!opts.tx) kickJobs();
}

/** Wakes this process's worker (after a transaction that queued jobs has committed). */
export function kickJobs(): void {
  remembered<JobWorker>(WORKER)?.kick();
}

const WORKER = 'jobs-worker';

export interface WorkerOptions {
  /** how long a taken job is ours without renewal (default 60 s; renewed every third of it) */
  leaseMs?: number;
  /** how often an idle worker looks for ready jobs (default 1 s) */
  pollMs?: number;
  /** names the lease holder (default host:pid:random) */
  owner?: string;
}

const message = (e: unknown) => (e instanceof Error ? e.message : String(e)).slice(0, 480);

export class JobWorker {
  readonly owner: string;
  private readonly kinds: Map<string, JobKind<unknown>>;
  private readonly leaseMs: number;
  private readonly pollMs: number;
  /** job id → its kind, for the jobs this worker runs now */
  private readonly running = new Map<number, string>();
  private readonly finished = new Set<Promise<void>>();
  private poll: NodeJS.Timeout | undefined;
  private renew: NodeJS.Timeout | undefined;
  private ticking: Promise<void> | null = null;
  private again = false;
  private stopped = false;

  constructor(kinds: readonly JobKind<unknown>[], opts: WorkerOptions = {}) {
    this.kinds = new Map(kinds.map((k) => [k.kind, k]));
    this.leaseMs = opts.leaseMs ?? 60_000;
    this.pollMs = opts.pollMs ?? 1_000;
    this.owner = opts.owner ?? `${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`;
  }

  /** Queues what older processes left without a job, then takes jobs until stopped. */
  async start(): Promise<this> {
    for (const kind of this.kinds.values()) {
      const n = await kind.recover?.().catch((e: unknown) => (console.error(`[parley] jobs: could not recover ${kind.kind}:`, e), 0));
      if (n) console.log(`[parley] jobs: queued ${n} ${kind.kind} job(s) left by an earlier process`);
    }
    this.poll = setInterval(() => this.kick(), this.pollMs);
    this.poll.unref();
    this.renew = setInterval(() => void this.renewLeases(), Math.max(50, Math.floor(this.leaseMs / 3)));
    this.renew.unref();
    this.kick();
    return this;
  }

  kick(): void {
    if (this.stopped) return;
    if (this.ticking) {
      this.again = true;
      return;
    }
    this.ticking = this.tick()
      .catch((e: unknown) => console.error('[parley] jobs: could not take a job:', e))
      .finally(() => {
        this.ticking = null;
        if (this.again) {
          this.again = false;
          this.kick();
        }
      });
  }

  /** Takes ready jobs while this process has room for them; resolves once they are started. */
  async tick(): Promise<void> {
    for (const kind of this.kinds.values()) {
      while (!this.stopped && this.runningOf(kind.kind) < kind.concurrency) {
        const id = await this.take(kind.kind);
        if (id === null) break;
        this.running.set(id, kind.kind);
        const done: Promise<void> = this.run(kind, id).finally(() => {
          this.running.delete(id);
          this.finished.delete(done);
          this.kick();
        });
        this.finished.add(done);
      }
    }
  }

  /** Resolves when every job this worker has started so far has ended. */
  async idle(): Promise<void> {
    while (this.ticking || this.finished.size > 0) await Promise.all([this.ticking, ...this.finished]);
  }

  /**
   * Takes no more jobs. With `release`, hands the jobs it holds back to the queue at once (a
   * graceful stop: another process, or this one restarted, takes them without waiting for the
   * lease); without it they wait for their lease to run out, as a dead process's do.
   */
  async stop({ release = false } = {}): Promise<void> {
    this.stopped = true;
    clearInterval(this.poll);
    clearInterval(this.renew);
    await this.ticking; // a claim in flight ends first, so its job is handed back too
    const held = [...this.running.keys()];
    if (release && held.length > 0)
      await db()
        .update(jobs)
        .set({ state: 'queued', leaseOwner: null, leaseUntil: null, attempts: sql`GREATEST(${jobs.attempts} - 1, 0)` })
        .where(and(inArray(jobs.id, held), eq(jobs.leaseOwner, this.owner), eq(jobs.state, 'running')));
  }

  private runningOf(kind: string): number {
    let n = 0;
    for (const k of this.running.values()) if (k === kind) n++;
    return n;
  }

  private ready(now: Date) {
    return or(and(eq(jobs.state, 'queued'), lte(jobs.runAfter, now)), and(eq(jobs.state, 'running'), lt(jobs.leaseUntil, now)));
  }

  /**
   * The next job of this kind, now leased to this worker, or null. Candidates are each course's
   * oldest ready job, the course served least recently first (never served: first of all); the
   * claim is an UPDATE that matches only while the job is still ready, so of two processes
   * claiming the same job one gets it and the other tries the next candidate.
   */
  private async take(kind: string): Promise<number | null> {
    const now = new Date();
    const candidates = await db()
      .select({
        id: sql<number>`MIN(${jobs.id})`.mapWith(Number).as('first_id'),
        // (spelt out: drizzle writes a column inside an aliased expression without its table, which
        // the subquery would read as its own s.course_id)
        served: sql`(SELECT MAX(s.started_at) FROM jobs s WHERE s.kind = ${kind} AND s.course_id <=> jobs.course_id)`.as('served'),
      })
      .from(jobs)
      .where(and(eq(jobs.kind, kind), this.ready(now)))
      .groupBy(jobs.courseId)
      .orderBy(sql`served IS NOT NULL`, sql`served`, sql`first_id`)
      .limit(5);
    for (const c of candidates) {
      const [res] = await db()
        .update(jobs)
        .set({
          state: 'running',
          leaseOwner: this.owner,
          leaseUntil: new Date(now.getTime() + this.leaseMs),
          attempts: sql`${jobs.attempts} + 1`,
          again: false,
          startedAt: now,
        })
        .where(and(eq(jobs.id, c.id), eq(jobs.kind, kind), this.ready(now)));
      if (res.affectedRows === 1) return c.id;
    }
    return null;
  }

  private async renewLeases(): Promise<void> {
    const held = [...this.running.keys()];
    if (held.length === 0 || this.stopped) return;
    await db()
      .update(jobs)
      .set({ leaseUntil: new Date(Date.now() + this.leaseMs) })
      .where(and(inArray(jobs.id, held), eq(jobs.leaseOwner, this.owner), eq(jobs.state, 'running')))
      .catch((e: unknown) => console.error('[parley] jobs: could not renew leases:', e));
  }

  private async run(kind: JobKind<unknown>, id: number): Promise<void> {
    const [row] = await db().select().from(jobs).where(eq(jobs.id, id));
    if (!row) return;
    const mine = and(eq(jobs.id, id), eq(jobs.leaseOwner, this.owner), eq(jobs.state, 'running'));
    const end = async (error: string | null) => {
      const finishedAt = new Date();
      if (kind.everyMs !== undefined) {
        await db()
          .update(jobs)
          .set({
            state: 'queued',
            leaseOwner: null,
            leaseUntil: null,
            attempts: 0,
            runAfter: new Date(finishedAt.getTime() + kind.everyMs),
            error,
            finishedAt,
          })
          .where(mine);
        return;
      }
      const [res] = await db()
        .update(jobs)
        .set({ state: error === null ? 'done' : 'failed', activeKey: null, leaseOwner: null, leaseUntil: null, error, finishedAt })
        .where(and(mine, eq(jobs.again, false)));
      if (res.affectedRows === 1) return;
      // asked for again while it ran: once more (its key kept, so no second copy is queued meanwhile)
      await db()
        .update(jobs)
        .set({ state: 'queued', again: false, leaseOwner: null, leaseUntil: null, runAfter: finishedAt, error, finishedAt })
        .where(mine);
    };

    const parsed = kind.payload.safeParse(row.payload);
    if (!parsed.success) {
      await end(`The job's payload was refused: ${parsed.error.issues[0]?.message ?? 'invalid'}`);
      return;
    }
    const maxAttempts = kind.maxAttempts ?? 3;
    if (row.attempts > maxAttempts) {
      const why = `Given up after ${maxAttempts} attempts: the process running it stopped each time.`;
      await kind.failed?.(parsed.data, why).catch(() => undefined);
      await end(why);
      return;
    }
    let error: string | null = null;
    try {
      await kind.run(parsed.data, { id, attempts: row.attempts });
    } catch (e: unknown) {
      error = message(e);
      await kind.failed?.(parsed.data, error).catch((err: unknown) => console.error(`[parley] jobs: ${kind.kind} failed:`, err));
    }
    // (if this write fails the lease is no longer renewed, and the job is run again once it runs out)
    await end(error);
  }
}

/** Starts this process's one worker (server.ts); later calls return the same one. */
export function startJobWorker(kinds: readonly JobKind<unknown>[], opts: WorkerOptions = {}): JobWorker {
  return remember(WORKER, () => {
    const w = new JobWorker(kinds, opts);
    w.start().catch((e: unknown) => console.error('[parley] jobs: could not start:', e));
    return w;
  });
}

/** Stops this process's worker, handing back the jobs it holds (server.ts, on SIGTERM). */
export async function stopJobWorker(): Promise<void> {
  const w = remembered<JobWorker>(WORKER);
  forget(WORKER);
  await w?.stop({ release: true });
}
