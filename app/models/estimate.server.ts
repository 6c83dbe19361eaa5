// Strategy-frequency estimations of a course, stored in `estimates` so a Debrief reloads
// instantly and the same request is answered from the stored row. Each runs as a job (app/jobs:
// queued in MariaDB, one at a time per process, taking turns between courses), at most
// ESTIMATES_PER_USER queued or running per person; the bootstrap goes to worker threads
// (app/lib/sfem-workers.server.ts), progress is written to the row as replicates come back, so any
// page can poll it.
import { createHash } from 'node:crypto';
import { and, asc, count, desc, eq, gt, inArray, ne } from 'drizzle-orm';
import { z } from 'zod';
import { defineJob, enqueue, kickJobs } from '#app/jobs/queue.server';
import { libraryStrategy } from '#app/lib/automata';
import { buildPanel, parseWindow, type ChoiceRow } from '#app/lib/panel';
import { estimateGroups, posteriorCounts } from '#app/lib/sfem';
import { groupByTreatment, treatmentTitles, type TreatmentSession } from '#app/lib/treatment';
import { bootstrapOnWorkers } from '#app/lib/sfem-workers.server';
import { db } from '#app/utils/db.server';
import { env } from '#app/utils/env.server';
import { canonicalRequest, estimateRequestSchema, type EstimateRequest } from '#app/utils/estimate-form';
import { datasets, estimates, users } from '#drizzle/schema';
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

/** One estimation of the course (a read: a cut-off run is the jobs queue's to resume). */
export async function getEstimate(courseId: number, id: number): Promise<EstimateStatus | null> {
  const [r] = await db()
    .select()
    .from(estimates)
    .where(and(eq(estimates.courseId, courseId), eq(estimates.id, id)));
  return r ? toStatus(r) : null;
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
  // The user's row is locked while the cap is checked and the estimation queued, so two requests at
  // once (to this process or another) cannot both take the last place.
  const cap = env().ESTIMATES_PER_USER;
  const queued = await db().transaction(async (tx) => {
    await tx.select({ id: users.id }).from(users).where(eq(users.id, userId)).for('update');
    const [{ held }] = await tx
      .select({ held: count() })
      .from(estimates)
      .where(and(eq(estimates.createdBy, userId), inArray(estimates.status, ['queued', 'running'])));
    if (held >= cap) return { ok: false as const, held };
    const [res] = await tx
      .insert(estimates)
      .values({ courseId, request, requestKey: key, status: 'queued', progress: 0, total: request.bootstrap, createdBy: userId });
    await enqueue(estimateJob, { estimateId: res.insertId }, { courseId, key: jobKey(res.insertId), tx });
    return { ok: true as const, id: res.insertId };
  });
  if (!queued.ok) {
    return {
      ok: false,
      status: 429,
      code: 'too_many_estimations',
      message: `You have ${queued.held} estimations queued or running, the most one person may have at a time (${cap}). Start this one when one of them has finished.`,
    };
  }
  kickJobs();
  return { ok: true, estimate: (await getEstimate(courseId, queued.id))!, reused: false };
}

// ---------------------------------------------------------------------------------------------
// The job: one estimation at a time per process (two bootstrap workers already fill the
// machine's two cores); the queue takes turns between courses.

const jobKey = (estimateId: number) => `estimate:${estimateId}`;

export const estimateJob = defineJob({
  kind: 'estimate',
  payload: z.object({ estimateId: z.number().int().positive() }),
  concurrency: 1,
  run: ({ estimateId }) => run(estimateId),
  failed: async ({ estimateId }, message) => {
    await db().update(estimates).set({ status: 'failed', error: message, finishedAt: new Date() }).where(eq(estimates.id, estimateId));
  },
  // Rows queued or running with no job (queued before the jobs table existed): queue them.
  recover: async () => {
    const open = await db()
      .select({ id: estimates.id, courseId: estimates.courseId })
      .from(estimates)
      .where(inArray(estimates.status, ['queued', 'running']));
    for (const e of open) await enqueue(estimateJob, { estimateId: e.id }, { courseId: e.courseId, key: jobKey(e.id) });
    return open.length;
  },
});

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
            onProgress: (done) => report(i * B + done),
          })
        : null;
    const { assigned, expected } = posteriorCounts(e.posteriors, e.strategies.length);
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

/** The research API's page of a course's estimations: ids after `afterId`, ascending, at most `limit`. */
export async function estimatesAfter(courseId: number, afterId: number, limit: number) {
  return db()
    .select()
    .from(estimates)
    .where(and(eq(estimates.courseId, courseId), gt(estimates.id, afterId)))
    .orderBy(asc(estimates.id))
    .limit(limit);
}
