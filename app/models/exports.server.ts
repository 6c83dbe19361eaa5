// Exports that carry personal data (the identified panel, the credit sheet) and their log.
import { and, count, desc, eq, inArray, isNotNull, sql } from 'drizzle-orm';
import { type Credit, creditFor } from '#app/lib/credit';
import { type CsvColumn, csvLines } from '#app/lib/csv';
import type { CreditRule } from '#app/lib/design';
import { db } from '#app/utils/db.server';
import { choices, exportLog, sessionParticipants, sessions, users } from '#drizzle/schema';
import { type PanelSession, panelPages, panelParticipants } from './panel-export.server';
import { sessionColumns, toSession } from './session-row.server';

export type ExportKind = 'panel-identified' | 'credit-sheet';

/** Who downloaded personal data, and when. */
export async function logExport(courseId: number, sessionId: number | null, userId: number, kind: ExportKind) {
  await db().insert(exportLog).values({ courseId, sessionId, userId, kind });
}

export async function listExportLog(courseId: number, limit = 20) {
  return db()
    .select({ id: exportLog.id, kind: exportLog.kind, sessionId: exportLog.sessionId, at: exportLog.createdAt, email: users.email })
    .from(exportLog)
    .innerJoin(users, eq(users.id, exportLog.userId))
    .where(eq(exportLog.courseId, courseId))
    .orderBy(desc(exportLog.id))
    .limit(limit);
}

/** The course's completed sessions, and how much each holds. */
export async function listExportableSessions(courseId: number) {
  const list = (
    await db()
      .select(sessionColumns)
      .from(sessions)
      .where(and(eq(sessions.courseId, courseId), inArray(sessions.status, ['complete', 'archived'])))
      .orderBy(desc(sessions.id))
  ).map(toSession);
  if (list.length === 0) return [];
  const ids = list.map((s) => s.id);
  // counted for these sessions only (the choices table holds every course's)
  const [rows, people] = await Promise.all([
    db()
      .select({ sessionId: choices.sessionId, n: count() })
      .from(choices)
      .where(and(inArray(choices.sessionId, ids), isNotNull(choices.participantKey)))
      .groupBy(choices.sessionId),
    db()
      .select({
        sessionId: sessionParticipants.sessionId,
        n: count(),
        declined: sql<number>`SUM(CASE WHEN ${sessionParticipants.consent} = 0 THEN 1 ELSE 0 END)`,
      })
      .from(sessionParticipants)
      .where(inArray(sessionParticipants.sessionId, ids))
      .groupBy(sessionParticipants.sessionId),
  ]);
  const rowsOf = new Map(rows.map((r) => [r.sessionId, r.n]));
  const peopleOf = new Map(people.map((p) => [p.sessionId, p]));
  return list.map((s) => ({
    id: s.id,
    treatment: s.treatment,
    status: s.status,
    simulated: s.simulated,
    delta: s.design.delta,
    completedAt: s.completedAt,
    rows: Number(rowsOf.get(s.id) ?? 0),
    participants: Number(peopleOf.get(s.id)?.n ?? 0),
    declined: Number(peopleOf.get(s.id)?.declined ?? 0),
  }));
}

export interface CreditLine {
  key: string;
  pseudonym: string;
  name: string;
  email: string;
  studentId: string;
  points: number;
  credit: Credit;
}

/**
 * Points and credit of every participant of a session (consent plays no part: grades must not
 * depend on it, methods.md §8). Points are the payoffs of the rounds that count (round ≤ L) and
 * that the participant played (a computer's rounds after a hand-over are not theirs).
 */
export async function creditSheet(session: PanelSession): Promise<CreditLine[]> {
  const rule = session.credit;
  const people = await panelParticipants(session);
  const points = new Map<string, number>();
  const keyOf = new Map(people.map((p) => [p.pseudonym, p.key]));
  for await (const page of panelPages([session], { identified: true })) {
    for (const r of page.rows) {
      if (r.supergame_length !== null && r.round > r.supergame_length) continue;
      // a computer's rounds in the seat after a hand-over earn the participant nothing (decision 030)
      if (r.origin === 'computer_seat') continue;
      const key = keyOf.get(r.pseudonym)!;
      points.set(key, (points.get(key) ?? 0) + r.payoff);
    }
  }
  return people.map((p) => {
    // sums of payoffs with decimals: keep 4 decimals, as the designs do
    const pts = Math.round((points.get(p.key) ?? 0) * 1e4) / 1e4;
    return {
      key: p.key,
      pseudonym: p.pseudonym,
      name: p.name ?? '',
      email: p.email,
      studentId: p.studentId ?? '',
      points: pts,
      credit: creditFor(rule, pts),
    };
  });
}

/** The sheet as CSV for a gradebook import: one line per participant, `.` decimals. */
export function creditCsv(lines: readonly CreditLine[], rule: CreditRule): string {
  const paid = rule.kind === 'paid';
  const text = (key: string): CsvColumn => ({ key, type: 'text' });
  const number = (key: string): CsvColumn => ({ key, type: 'number' });
  const person = [text('student_id'), text('name'), text('email'), text('pseudonym'), number('points')];
  const columns = paid ? [...person, number('payout'), text('currency')] : [...person, number('credit')];
  const rows = lines.map((l) => ({
    student_id: l.studentId,
    name: l.name,
    email: l.email,
    pseudonym: l.pseudonym,
    points: l.points,
    ...(l.credit.kind === 'paid'
      ? { payout: l.credit.payout.toFixed(l.credit.decimals), currency: l.credit.currency }
      : { credit: l.credit.credit }),
  }));
  return csvLines(rows, columns);
}
