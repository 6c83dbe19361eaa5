// What every Debrief page (session, compare, projector, CSV) loads: the chosen sessions of a
// course, each with its de-identified Debrief numbers, and the stored estimations on them.
import { type Include, INCLUDES } from '#app/lib/choice-panel';
import { sessionDebrief, type SessionDebrief } from '#app/lib/debrief';
import type { Design } from '#app/lib/design';
import { groupByTreatment } from '#app/lib/treatment';
import { count, inArray } from 'drizzle-orm';
import { db } from '#app/utils/db.server';
import { sessionParticipants } from '#drizzle/schema';
import { estimatesForSessions, type EstimateStatus } from './estimate.server';
import { loadSessionPanel } from './panel.server';

export interface DebriefSession {
  id: number;
  /** short label for legends: "#12 · Short horizon (δ = 1/2) — demo" */
  label: string;
  treatment: string;
  status: string;
  simulated: boolean;
  completedAt: string | null;
  payoffs: Design['payoffs'];
  labels: Design['labels'];
  delta: number;
  /** with payoffs and δ, what makes the session's treatment (app/lib/treatment.ts) */
  termination: Design['termination'];
  matching: Design['matching'];
  debrief: SessionDebrief;
  /** rounds only one seat of a pair chose in (still running, or ended by "End now"): left out */
  unfinished: number;
  /** participants who declined research consent: shown to the class, left out of research data */
  declined: number;
  /** whether `declined` participants are in these numbers (the page) or not (downloads) */
  keepsDeclined: boolean;
}

export interface DebriefData {
  sessions: DebriefSession[];
  /** stored estimations on exactly these sessions, newest first */
  estimates: EstimateStatus[];
}

export interface DebriefOptions {
  /** which choices the figures use (the page's switch, `?include=all`) */
  include?: Include;
  /**
   * true for what leaves Parley (chart downloads): participants who declined research consent
   * are left out. The page and the projector show the whole class its own play (teaching);
   * docs/decisions/026.
   */
  research?: boolean;
}

/** null when one of the sessions is not in the course (another course's session is not found either). */
export async function loadDebrief(courseId: number, sessionIds: readonly number[], opts: DebriefOptions = {}): Promise<DebriefData | null> {
  const include = opts.include ?? 'own';
  const sessions: DebriefSession[] = [];
  for (const id of sessionIds) {
    const s = await loadSessionPanel(courseId, id, { keepDeclined: !opts.research });
    if (!s) return null;
    const d = s.session.design;
    sessions.push({
      id,
      label: `#${id} · ${s.session.treatment}`,
      treatment: s.session.treatment,
      status: s.session.status,
      simulated: s.session.simulated,
      completedAt: s.session.completedAt?.toISOString() ?? null,
      payoffs: d.payoffs,
      labels: d.labels,
      delta: d.delta,
      termination: d.termination,
      matching: d.matching,
      debrief: sessionDebrief(s.rows, d, include),
      unfinished: s.unfinished.length,
      declined: s.declined,
      keepsDeclined: !opts.research,
    });
  }
  return { sessions, estimates: await estimatesForSessions(courseId, sessionIds) };
}

/** `?include=all` → every origin; anything else → own, paid choices (the default). */
export function includeParam(url: URL): Include {
  const v = url.searchParams.get('include');
  return (INCLUDES as readonly string[]).includes(v ?? '') ? (v as Include) : 'own';
}

/**
 * The chosen sessions grouped by treatment identity (names only label the groups). Sessions that
 * share a name but ran different treatments are refused unless the page asked for
 * `?treatments=separate` (app/lib/treatment.ts).
 */
export function debriefGrouping(sessions: readonly DebriefSession[], url: URL) {
  const separate = url.searchParams.get('treatments') === 'separate';
  return {
    separate,
    grouping: groupByTreatment(
      sessions.map((s) => ({ id: s.id, name: s.treatment, design: s })),
      { separate },
    ),
  };
}

/** `?estimate=ID` when it is one of these sessions' estimations, else the newest. */
export function pickEstimate(estimates: EstimateStatus[], url: URL): EstimateStatus | null {
  const wanted = Number(url.searchParams.get('estimate'));
  return estimates.find((e) => e.id === wanted) ?? estimates[0] ?? null;
}

/** Participants per session (ids already scoped to a course by the caller). */
export async function participantCounts(sessionIds: readonly number[]): Promise<Map<number, number>> {
  if (sessionIds.length === 0) return new Map();
  const rows = await db()
    .select({ sessionId: sessionParticipants.sessionId, n: count() })
    .from(sessionParticipants)
    .where(inArray(sessionParticipants.sessionId, [...sessionIds]))
    .groupBy(sessionParticipants.sessionId);
  return new Map(rows.map((r) => [r.sessionId, Number(r.n)]));
}
