// A session's stored rows → the choice panel of app/lib/panel.ts (one row per participant ×
// supergame × round), de-identified: pseudonyms only. The Debrief and the estimation read sessions
// through this one file; `sessionPanelRows` is pure (tested on a constructed session), the loader
// below only fetches the rows it needs, always scoped by course.
import { and, asc, eq, inArray } from 'drizzle-orm';
import type { Action } from '#app/lib/automata';
import { designSchema, type Design } from '#app/lib/design';
import type { ChoiceRow } from '#app/lib/panel';
import { stagePayoff } from '#app/lib/stage-game';
import { db } from '#app/utils/db.server';
import { choices, sessionPairs, sessionParticipants, sessions, supergameDraws } from '#drizzle/schema';

export type ChoiceSource = 'player' | 'timeout' | 'computer';

/** A panel row with the columns of product.md's choice panel that the Debrief needs. */
export interface SessionPanelRow extends ChoiceRow {
  /** the participant's own stage payoff this round, from the design frozen into the session */
  payoff: number;
  /** round ≤ supergame length (block termination plays rounds after the end, unpaid) */
  paid: boolean;
  /** who made this choice: the participant, the timeout rule, or a computer that took the seat */
  source: ChoiceSource;
  partnerSource: ChoiceSource;
  /** the session's common draw after this round (null if none was stored) */
  draw: number | null;
  /** L: the paid rounds of this supergame (the session's common draw sequence) */
  supergameLength: number;
  decisionMs: number;
  atMs: number;
}

/** What `sessionPanelRows` needs from the tables (the shapes drizzle returns). */
export interface StoredSessionRows {
  session: { id: number; treatment: string; design: Pick<Design, 'payoffs'> };
  participants: { participantKey: string; pseudonym: string }[];
  choices: {
    supergame: number;
    round: number;
    pairId: string;
    seat: number;
    participantKey: string | null;
    action: Action;
    source: ChoiceSource;
    strategy: string | null;
    decisionMs: number;
    atMs: number;
  }[];
  draws: { supergame: number; draws: number[]; length: number }[];
  pairs: { supergame: number; pairId: string; seat0: string | null; seat1: string | null; computerStrategy: string | null }[];
}

const SEP = '\u0000';

/**
 * One row per human seat × round, sorted by pseudonym, supergame, round. The partner is the other
 * seat's pseudonym, or `computer:<strategy>` for a disclosed odd-count computer partner. Throws on
 * rows that contradict each other (a seat without its partner's choice, an unknown participant):
 * the engine never stores such a session.
 */
export function sessionPanelRows(stored: StoredSessionRows): SessionPanelRow[] {
  const session = String(stored.session.id);
  const { treatment } = stored.session;
  const game = stored.session.design.payoffs;
  const pseudonyms = new Map(stored.participants.map((p) => [p.participantKey, p.pseudonym]));
  const draws = new Map(stored.draws.map((d) => [d.supergame, d]));
  const pairs = new Map(stored.pairs.map((p) => [p.supergame + SEP + p.pairId, p]));
  const bySeat = new Map(stored.choices.map((c) => [[c.supergame, c.round, c.pairId, c.seat].join(SEP), c]));

  const rows: SessionPanelRow[] = [];
  for (const c of stored.choices) {
    if (c.participantKey === null) continue; // the odd-count computer's own seat: not a participant
    const where = `supergame ${c.supergame}, round ${c.round}, pair ${c.pairId}`;
    const subject = pseudonyms.get(c.participantKey);
    if (!subject) throw new Error(`session ${session}: choice of unknown participant ${c.participantKey} (${where})`);
    const other = bySeat.get([c.supergame, c.round, c.pairId, 1 - c.seat].join(SEP));
    if (!other) throw new Error(`session ${session}: no partner choice for ${subject} (${where})`);
    const pair = pairs.get(c.supergame + SEP + c.pairId);
    let partner: string;
    if (other.participantKey !== null) {
      const p = pseudonyms.get(other.participantKey);
      if (!p) throw new Error(`session ${session}: choice of unknown participant ${other.participantKey} (${where})`);
      partner = p;
    } else {
      partner = `computer:${pair?.computerStrategy ?? other.strategy ?? 'unknown'}`;
    }
    const d = draws.get(c.supergame);
    if (!d) throw new Error(`session ${session}: no draws stored for supergame ${c.supergame}`);
    rows.push({
      session,
      treatment,
      subject,
      partner,
      supergame: c.supergame,
      round: c.round,
      action: c.action,
      partnerAction: other.action,
      payoff: stagePayoff(game, c.action, other.action),
      paid: c.round <= d.length,
      source: c.source,
      partnerSource: other.source,
      draw: d.draws[c.round - 1] ?? null,
      supergameLength: d.length,
      decisionMs: c.decisionMs,
      atMs: c.atMs,
    });
  }
  const byText = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);
  return rows.sort((a, b) => byText(a.subject, b.subject) || a.supergame - b.supergame || a.round - b.round);
}

/** For SFEM: the choices participants made themselves or by the timeout rule (not a computer's). */
export function estimationRows(rows: readonly SessionPanelRow[]): ChoiceRow[] {
  return rows.filter((r) => r.source !== 'computer');
}

export interface SessionInfo {
  id: number;
  courseId: number;
  treatment: string;
  design: Design;
  status: (typeof sessions.$inferSelect)['status'];
  simulated: boolean;
  startedAt: Date | null;
  completedAt: Date | null;
}

const sessionColumns = {
  id: sessions.id,
  courseId: sessions.courseId,
  treatment: sessions.treatment,
  params: sessions.params,
  status: sessions.status,
  simulated: sessions.simulated,
  startedAt: sessions.startedAt,
  completedAt: sessions.completedAt,
};

function toInfo(s: { id: number; courseId: number; treatment: string; params: unknown; status: SessionInfo['status']; simulated: number; startedAt: Date | null; completedAt: Date | null }): SessionInfo {
  return { ...s, design: designSchema.parse(s.params), simulated: s.simulated === 1 };
}

/** Sessions of a course (scoped: another course's session is not found). */
export async function listCourseSessions(courseId: number): Promise<SessionInfo[]> {
  const rows = await db().select(sessionColumns).from(sessions).where(eq(sessions.courseId, courseId)).orderBy(asc(sessions.id));
  return rows.map(toInfo);
}

export async function getCourseSessions(courseId: number, sessionIds: readonly number[]): Promise<SessionInfo[]> {
  if (sessionIds.length === 0) return [];
  const rows = await db()
    .select(sessionColumns)
    .from(sessions)
    .where(and(eq(sessions.courseId, courseId), inArray(sessions.id, [...sessionIds])))
    .orderBy(asc(sessions.id));
  return rows.map(toInfo);
}

/** The panel rows of one session of a course; null when the course has no such session. */
export async function loadSessionPanel(courseId: number, sessionId: number): Promise<{ session: SessionInfo; rows: SessionPanelRow[] } | null> {
  const [session] = await getCourseSessions(courseId, [sessionId]);
  if (!session) return null;
  const [participants, choiceRows, draws, pairs] = await Promise.all([
    db()
      .select({ participantKey: sessionParticipants.participantKey, pseudonym: sessionParticipants.pseudonym })
      .from(sessionParticipants)
      .where(eq(sessionParticipants.sessionId, sessionId)),
    db()
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
    db()
      .select({ supergame: supergameDraws.supergame, draws: supergameDraws.draws, length: supergameDraws.length })
      .from(supergameDraws)
      .where(eq(supergameDraws.sessionId, sessionId)),
    db()
      .select({
        supergame: sessionPairs.supergame,
        pairId: sessionPairs.pairId,
        seat0: sessionPairs.seat0,
        seat1: sessionPairs.seat1,
        computerStrategy: sessionPairs.computerStrategy,
      })
      .from(sessionPairs)
      .where(eq(sessionPairs.sessionId, sessionId)),
  ]);
  const rows = sessionPanelRows({ session: { id: session.id, treatment: session.treatment, design: session.design }, participants, choices: choiceRows, draws, pairs });
  return { session, rows };
}

/** The pseudonym a user had in a session, or null if they did not take part. */
export async function pseudonymOf(sessionId: number, userId: number): Promise<string | null> {
  const [p] = await db()
    .select({ pseudonym: sessionParticipants.pseudonym })
    .from(sessionParticipants)
    .where(and(eq(sessionParticipants.sessionId, sessionId), eq(sessionParticipants.userId, userId)));
  return p?.pseudonym ?? null;
}
