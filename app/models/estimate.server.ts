// Strategy-frequency estimations of a course, stored in `estimates` so a Debrief reloads
// instantly and the same request is answered from the stored row. Runs in this process, one at a
// time, taking turns between courses (app/lib/fair-queue.ts), at most ESTIMATES_PER_USER queued
// or running per person; the bootstrap goes to worker threads (app/lib/sfem-workers.server.ts),
// progress is written to the row as replicates come back, so any page can poll it.
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { and, asc, desc, eq, gt, ne } from 'drizzle-orm';
import { libraryStrategy } from '#app/lib/automata';
import { FairQueue } from '#app/lib/fair-queue';
import { buildPanel, parseWindow, type ChoiceRow } from '#app/lib/panel';
import { estimateGroups } from '#app/lib/sfem';
import { groupByTreatment, treatmentTitles, type TreatmentSession } from '#app/lib/treatment';
import { bootstrapOnWorkers } from '#app/lib/sfem-workers.server';
import { db } from '#app/utils/db.server';
import { env } from '#app/utils/env.server';
import { canonicalRequest, estimateRequestSchema, type EstimateRequest } from '#app/utils/estimate-form';
import { datasets, estimates } from '#drizzle/schema';
import { datasetChoiceRows } from './datasets.server';
import { estimationRows, type OriginCounts } from '#app/lib/choice-panel';
import { getCourseSessions, loadSessionPanel, type SessionInfo } from './panel.server';

export interface GroupResult {
  group: string;
  sessions: string[];
  subjects: number;
  choices: number;
  strategies: string[];
  shares: number[];
  /** bootstrap standard deviations of the shares (null without a bootstrap) */
  se: number[] | null;
  beta: number;
  seBeta: number | null;
  gamma: number;
  errorProbability: number;
  logLik: number;
  aic: number;
  bic: number;
  converged: boolean;
  /** subjects whose highest posterior is this strategy (ties: the earlier strategy) */
  assigned: number[];
  /** Σ_i posterior probability of each strategy (expected number of subjects) */
  expected: number[];
}

/** What an estimation on sessions left out (stored with its result). */
export interface LeftOut extends OriginCounts {
  /** own, paid choices after a left-out one in the same supergame (see estimationRows) */
  afterLeftOut: number;
  /** rounds only one seat of a pair chose in */
  unfinished: number;
  /** participants who declined research consent (never estimated) */
  declined: number;
}

export interface EstimateResult {
  window: string;
  /** sessions only: which choices were used and what was left out (absent on older results) */
  include?: EstimateRequest['include'];
  leftOut?: LeftOut;
  strategies: string[];
  bootstrap: number;
  seed: number;
  warnings: string[];
  groups: GroupResult[];
}

export interface EstimateStatus {
  id: number;
  status: 'queued' | 'running' | 'done' | 'failed';
  progress: number;
  total: number;
  error: string | null;
  request: EstimateRequest;
  result: EstimateResult | null;
  createdAt: string;
}

/**
 * Estimations on sessions group by treatment identity (docs/decisions/027); those stored before
 * grouped by design name. The marker keeps the key of a sessions request apart from theirs, so an
 * old name-grouped result is never handed out for a new request.
 */
const GROUPING = 'treatment-identity';
const asTreatmentSession = (s: SessionInfo): TreatmentSession => ({ id: s.id, name: s.treatment, design: s.design });

export const requestKey = (r: EstimateRequest) => {
  const c = canonicalRequest(r);
  return createHash('sha256')
    .update(JSON.stringify(c.source.kind === 'sessions' ? { ...c, grouping: GROUPING } : c))
    .digest('hex');
};

type Row = typeof estimates.$inferSelect;
const toStatus = (r: Row): EstimateStatus => ({
  id: r.id,
  status: r.status,
  progress: r.progress,
  total: r.total,
  error: r.error,
  request: estimateRequestSchema.parse(r.request),
  result: (r.result as EstimateResult | null) ?? null,
  createdAt: r.createdAt.toISOString(),
});

export async function getEstimate(courseId: number, id: number): Promise<EstimateStatus | null> {
  const [r] = await db()
    .select()
    .from(estimates)
    .where(and(eq(estimates.courseId, courseId), eq(estimates.id, id)));
  if (!r) return null;
  // A queued or running row nobody in this process works on was cut off by a restart: run it again.
  if ((r.status === 'queued' || r.status === 'running') && !jobs().known.has(r.id))
    enqueue({ id: r.id, courseId: r.courseId, userId: r.createdBy });
  return toStatus(r);
}

/** The course's estimations on exactly these sessions (any window), newest first. */
export async function estimatesForSessions(courseId: number, sessionIds: readonly number[]): Promise<EstimateStatus[]> {
  const wanted = [...new Set(sessionIds)].sort((a, b) => a - b).join(',');
  const rows = await db().select().from(estimates).where(eq(estimates.courseId, courseId)).orderBy(desc(estimates.id)).limit(200);
  return rows.map(toStatus).filter((e) => e.request.source.kind === 'sessions' && e.request.source.sessionIds.join(',') === wanted);
}

/** The course's estimations on one uploaded dataset, newest first. */
export async function estimatesForDataset(courseId: number, datasetId: number): Promise<EstimateStatus[]> {
  const rows = await db().select().from(estimates).where(eq(estimates.courseId, courseId)).orderBy(desc(estimates.id)).limit(200);
  return rows.map(toStatus).filter((e) => e.request.source.kind === 'dataset' && e.request.source.datasetId === datasetId);
}

export type StartResult =
  | { ok: true; estimate: EstimateStatus; reused: boolean }
  | { ok: false; status: 404; code: 'not_found'; message: string }
  | { ok: false; status: 409; code: 'mixed_treatments'; message: string }
  | { ok: false; status: 429; code: 'too_many_estimations'; message: string };

/**
 * Starts an estimation, or returns the stored one for the same request (same data, window,
 * strategies, B and seed). A failed run is not reused: asking again runs it again.
 */
export async function startEstimate(
  courseId: number,
  userId: number,
  input: EstimateRequest,
  opts: { separate?: boolean } = {},
): Promise<StartResult> {
  const request = canonicalRequest(input);
  if (request.source.kind === 'sessions') {
    const found = await getCourseSessions(courseId, request.source.sessionIds);
    if (found.length !== request.source.sessionIds.length)
      return { ok: false, status: 404, code: 'not_found', message: 'A chosen session is not in this course.' };
    // Groups are treatments (frozen parameters); same-named sessions of different treatments are
    // estimated apart only when asked, never pooled under their shared name.
    const grouping = groupByTreatment(found.map(asTreatmentSession), opts);
    if (!grouping.ok)
      return {
        ok: false,
        status: 409,
        code: 'mixed_treatments',
        message: `${grouping.message} Estimate them as separate treatments instead.`,
      };
  } else {
    const [d] = await db()
      .select({ id: datasets.id })
      .from(datasets)
      .where(and(eq(datasets.courseId, courseId), eq(datasets.id, request.source.datasetId)));
    if (!d) return { ok: false, status: 404, code: 'not_found', message: 'That dataset is not in this course.' };
  }
  const key = requestKey(request);
  const [existing] = await db()
    .select()
    .from(estimates)
    .where(and(eq(estimates.courseId, courseId), eq(estimates.requestKey, key), ne(estimates.status, 'failed')))
    .orderBy(desc(estimates.id))
    .limit(1);
  if (existing) {
    const estimate = (await getEstimate(courseId, existing.id))!;
    return { ok: true, estimate, reused: true };
  }
  // The cap is checked and a place taken in one synchronous step, so two requests at once cannot
  // both take the last place; the place is the queue's entry once the row exists.
  const j = jobs();
  const cap = env().ESTIMATES_PER_USER;
  const held = liveOf(userId) + (j.admitting.get(userId) ?? 0);
  if (held >= cap) {
    return {
      ok: false,
      status: 429,
      code: 'too_many_estimations',
      message: `You have ${held} estimations queued or running, the most one person may have at a time (${cap}). Start this one when one of them has finished.`,
    };
  }
  j.admitting.set(userId, (j.admitting.get(userId) ?? 0) + 1);
  let id: number;
  try {
    const [res] = await db()
      .insert(estimates)
      .values({ courseId, request, requestKey: key, status: 'queued', progress: 0, total: request.bootstrap, createdBy: userId });
    id = res.insertId;
    enqueue({ id, courseId, userId });
  } finally {
    const left = j.admitting.get(userId)! - 1;
    if (left > 0) j.admitting.set(userId, left);
    else j.admitting.delete(userId);
  }
  return { ok: true, estimate: (await getEstimate(courseId, id))!, reused: false };
}

// ---------------------------------------------------------------------------------------------
// The runner: one estimation at a time in this process (two bootstrap workers already fill the
// machine's two cores), the next one taken from the course served least recently, so one
// course's batch of estimations does not hold up another course's. Kept on globalThis so a
// development reload does not start a second queue.

interface Job {
  id: number;
  courseId: number;
  userId: number;
}

interface Runner {
  /** every job queued or running in this process, by estimate id */
  known: Map<number, Job>;
  queue: FairQueue<number, Job>;
  running: boolean;
  /** places taken by requests between the cap check and their queue entry, per user */
  admitting: Map<number, number>;
}

declare global {
  // one per process: kept across Vite's reloads of this module, shared by server.ts and the built bundle
  var __parleyEstimatesFair: Runner | undefined;
}
const g = globalThis;
function jobs(): Runner {
  g.__parleyEstimatesFair ??= { known: new Map(), queue: new FairQueue(), running: false, admitting: new Map() };
  return g.__parleyEstimatesFair;
}

/** A user's estimations queued or running in this process. */
function liveOf(userId: number): number {
  let n = 0;
  for (const job of jobs().known.values()) if (job.userId === userId) n++;
  return n;
}

function enqueue(job: Job) {
  const j = jobs();
  if (j.known.has(job.id)) return;
  j.known.set(job.id, job);
  j.queue.push(job.courseId, job);
  if (!j.running) void drain(j);
}

async function drain(j: Runner) {
  j.running = true;
  try {
    for (let job = j.queue.shift(); job; job = j.queue.shift()) {
      const { id } = job;
      try {
        await run(id);
      } catch (e: unknown) {
        const message = (e instanceof Error ? e.message : String(e)).slice(0, 480);
        await db()
          .update(estimates)
          .set({ status: 'failed', error: message, finishedAt: new Date() })
          .where(eq(estimates.id, id))
          .catch(() => undefined);
      } finally {
        j.known.delete(id);
      }
    }
  } finally {
    j.running = false;
  }
}

async function loadRows(courseId: number, request: EstimateRequest): Promise<{ rows: ChoiceRow[]; leftOut: LeftOut | null }> {
  if (request.source.kind === 'sessions') {
    const rows: ChoiceRow[] = [];
    const leftOut: LeftOut = { used: 0, timeout: 0, computer_seat: 0, unpaid_round: 0, afterLeftOut: 0, unfinished: 0, declined: 0 };
    // SFEM groups by the rows' treatment column: for sessions that is the treatment's identity
    // (names and parameters), not the design's name (app/lib/treatment.ts).
    const titles = treatmentTitles((await getCourseSessions(courseId, request.source.sessionIds)).map(asTreatmentSession));
    for (const id of request.source.sessionIds) {
      // research data: participants who declined research consent are left out (docs/decisions/026)
      const s = await loadSessionPanel(courseId, id);
      if (!s) throw new Error(`Session ${id} is not in this course.`);
      const used = estimationRows(s.rows, request.include ?? 'own');
      const title = titles.get(id)!;
      for (const r of used.rows) rows.push({ ...r, treatment: title });
      for (const k of ['used', 'timeout', 'computer_seat', 'unpaid_round'] as const) leftOut[k] += used.counts[k];
      leftOut.afterLeftOut += used.afterLeftOut;
      leftOut.unfinished += s.unfinished.length;
      leftOut.declined += s.declined;
    }
    return { rows, leftOut };
  }
  const rows = await datasetChoiceRows(courseId, request.source.datasetId);
  if (!rows) throw new Error('The dataset was deleted.');
  return { rows, leftOut: null };
}

async function run(id: number) {
  const [row] = await db().select().from(estimates).where(eq(estimates.id, id));
  if (!row || row.status === 'done' || row.status === 'failed') return;
  const request = estimateRequestSchema.parse(row.request);
  await db().update(estimates).set({ status: 'running', progress: 0 }).where(eq(estimates.id, id));

  const loaded = await loadRows(row.courseId, request);
  const built = buildPanel(loaded.rows, { shorterSupergames: loaded.leftOut ? 'expected' : 'warn' });
  if (built.errors.length > 0) throw new Error(`The data cannot be estimated: ${built.errors[0].message}`);
  const groups = estimateGroups(built.panel, {
    by: 'treatment',
    window: parseWindow(request.window),
    strategies: request.strategies.map(libraryStrategy),
    seed: request.seed,
  });
  if (groups.length === 0) throw new Error('No participant has choices in this window of supergames.');
  const B = request.bootstrap;
  const total = B * groups.length;
  await db().update(estimates).set({ total }).where(eq(estimates.id, id));

  // Progress goes to the row at most every 150 ms, one write at a time.
  let written = 0;
  let wanted = 0;
  let writing: Promise<unknown> = Promise.resolve();
  let last = 0;
  const report = (done: number, force = false) => {
    wanted = done;
    const now = Date.now();
    if (!force && now - last < 150) return;
    last = now;
    writing = writing.then(async () => {
      if (wanted === written) return;
      const v = wanted;
      await db().update(estimates).set({ progress: v }).where(eq(estimates.id, id));
      written = v;
    });
  };

  const results: GroupResult[] = [];
  for (const [i, gEst] of groups.entries()) {
    const e = gEst.estimate;
    const boot =
      B > 0
        ? await bootstrapOnWorkers(gEst.table, e, {
            B,
            seed: request.seed,
            workers: 2,
            workerUrl: workerUrl(),
            onProgress: (done) => report(i * B + done),
          })
        : null;
    const K = e.strategies.length;
    const assigned = new Array<number>(K).fill(0);
    const expected = new Array<number>(K).fill(0);
    for (const p of e.posteriors) {
      let best = 0;
      p.probabilities.forEach((v, k) => {
        expected[k] += v;
        if (v > p.probabilities[best] + 1e-12) best = k;
      });
      assigned[best]++;
    }
    results.push({
      group: gEst.group,
      sessions: [...new Set(gEst.table.subjects.map((s) => s.slice(0, s.indexOf('/'))))],
      subjects: e.subjects,
      choices: e.choices,
      strategies: e.strategies,
      shares: e.shares,
      se: boot ? boot.sdShares : null,
      beta: e.beta,
      seBeta: boot ? boot.sdBeta : null,
      gamma: e.gamma,
      errorProbability: e.errorProbability,
      logLik: e.logLik,
      aic: e.aic,
      bic: e.bic,
      converged: e.converged,
      assigned,
      expected,
    });
  }
  report(total, true);
  await writing;
  const result: EstimateResult = {
    window: request.window,
    ...(loaded.leftOut ? { include: request.include ?? 'own', leftOut: loaded.leftOut } : {}),
    strategies: request.strategies,
    bootstrap: B,
    seed: request.seed,
    warnings: built.warnings.map((w) => w.message),
    groups: results,
  };
  await db().update(estimates).set({ status: 'done', progress: total, result, finishedAt: new Date() }).where(eq(estimates.id, id));
}

/**
 * The bootstrap workers' entry. From source (tsx, Vite in development, vitest) the module's own
 * file is right (undefined = the default). In the production build this code is bundled into
 * build/server, whose files must not be a worker's entry (they would load the whole app), so the
 * source file is used through tsx, which the server runs with anyway (docs/decisions/010).
 */
export function workerUrl(): URL | undefined {
  if (import.meta.url.endsWith('.ts')) return undefined;
  const rel = path.join('app', 'lib', 'sfem-workers.server.ts');
  let dir = path.dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 5; i++) {
    if (existsSync(path.join(dir, rel))) return pathToFileURL(path.join(dir, rel));
    dir = path.dirname(dir);
  }
  const fromCwd = path.resolve(rel);
  if (existsSync(fromCwd)) return pathToFileURL(fromCwd);
  throw new Error(`The bootstrap worker's entry ${rel} was not found beside the build.`);
}

/** The research API's page of a course's estimations: ids after `afterId`, ascending, at most `limit`. */
export async function estimatesAfter(courseId: number, afterId: number, limit: number) {
  return db()
    .select()
    .from(estimates)
    .where(and(eq(estimates.courseId, courseId), gt(estimates.id, afterId)))
    .orderBy(asc(estimates.id))
    .limit(limit);
}
