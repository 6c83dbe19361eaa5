// Sessions of a course for the Debrief and the estimation, and a session's whole choice panel in
// memory (the Debrief's charts need every row at once). The rows come from the one paged reader,
// app/models/panel-export.server.ts, always scoped by course; this file builds no rows itself.
import { and, asc, eq, inArray } from 'drizzle-orm';
import type { PanelRow, UnfinishedRound } from '#app/lib/choice-panel';
import { db } from '#app/utils/db.server';
import { sessionParticipants, sessions } from '#drizzle/schema';
import { panelPages, panelSessionOf } from './panel-export.server';
import { type Session, sessionColumns, toSession } from './session-row.server';

export type SessionInfo = Session;

/** Sessions of a course (scoped: another course's session is not found). */
export async function listCourseSessions(courseId: number): Promise<SessionInfo[]> {
  const rows = await db().select(sessionColumns).from(sessions).where(eq(sessions.courseId, courseId)).orderBy(asc(sessions.id));
  return rows.map(toSession);
}

export async function getCourseSessions(courseId: number, sessionIds: readonly number[]): Promise<SessionInfo[]> {
  if (sessionIds.length === 0) return [];
  const rows = await db()
    .select(sessionColumns)
    .from(sessions)
    .where(and(eq(sessions.courseId, courseId), inArray(sessions.id, [...sessionIds])))
    .orderBy(asc(sessions.id));
  return rows.map(toSession);
}

export interface SessionPanel {
  session: SessionInfo;
  rows: PanelRow[];
  /** rounds only one seat of a pair chose in (running, or ended by "End now"): not rows */
  unfinished: UnfinishedRound[];
  /** participants who declined research consent (consent = 0) */
  declined: number;
}

/**
 * The panel rows of one session of a course; null when the course has no such session.
 * `keepDeclined` is for what the class itself sees (the Debrief on screen, a participant's own
 * summary); research uses leave out those who declined (docs/decisions/026).
 */
export async function loadSessionPanel(
  courseId: number,
  sessionId: number,
  opts: { keepDeclined?: boolean; participantKeys?: readonly string[] } = {},
): Promise<SessionPanel | null> {
  const [session] = await getCourseSessions(courseId, [sessionId]);
  if (!session) return null;
  const rows: PanelRow[] = [];
  const unfinished: UnfinishedRound[] = [];
  const list = [panelSessionOf(session)];
  for await (const page of panelPages(list, { keepDeclined: opts.keepDeclined, participantKeys: opts.participantKeys })) {
    rows.push(...page.rows);
    unfinished.push(...page.unfinished);
  }
  const consents = await db()
    .select({ consent: sessionParticipants.consent })
    .from(sessionParticipants)
    .where(eq(sessionParticipants.sessionId, sessionId));
  return { session, rows, unfinished, declined: consents.filter((c) => c.consent === 0).length };
}

/** A user's place in a session (engine key and pseudonym), or null if they did not take part. */
export async function participantOf(sessionId: number, userId: number): Promise<{ key: string; pseudonym: string } | null> {
  const [p] = await db()
    .select({ key: sessionParticipants.participantKey, pseudonym: sessionParticipants.pseudonym })
    .from(sessionParticipants)
    .where(and(eq(sessionParticipants.sessionId, sessionId), eq(sessionParticipants.userId, userId)));
  return p ?? null;
}
