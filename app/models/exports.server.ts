// Exports that carry personal data (the identified panel, the credit sheet) and their log.
import { and, count, desc, eq, isNotNull, sql } from 'drizzle-orm';
import Papa from 'papaparse';
import { type Credit, creditFor } from '#app/lib/credit';
import { type CreditRule, designSchema } from '#app/lib/design';
import { db } from '#app/utils/db.server';
import { choices, exportLog, sessionParticipants, sessions, users } from '#drizzle/schema';
import { type PanelSession, panelPages, panelParticipants } from './panel-export.server';

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

/** The course's sessions with something to export, and how much. */
export async function listExportableSessions(courseId: number) {
  const rows = db()
    .select({ sessionId: choices.sessionId, n: count().as('row_n') })
    .from(choices)
    .where(isNotNull(choices.participantKey))
    .groupBy(choices.sessionId)
    .as('row_count');
  const people = db()
    .select({
      sessionId: sessionParticipants.sessionId,
      n: count().as('people_n'),
      declined: sql<number>`SUM(CASE WHEN ${sessionParticipants.consent} = 0 THEN 1 ELSE 0 END)`.as('declined'),
    })
    .from(sessionParticipants)
    .groupBy(sessionParticipants.sessionId)
    .as('people');
  const list = await db()
    .select({
      id: sessions.id,
      treatment: sessions.treatment,
      status: sessions.status,
      simulated: sessions.simulated,
      params: sessions.params,
      completedAt: sessions.completedAt,
      rows: rows.n,
      participants: people.n,
      declined: people.declined,
    })
    .from(sessions)
    .leftJoin(rows, eq(rows.sessionId, sessions.id))
    .leftJoin(people, eq(people.sessionId, sessions.id))
    .where(and(eq(sessions.courseId, courseId), sql`${sessions.status} IN ('complete', 'archived')`))
    .orderBy(desc(sessions.id));
  return list.map((s) => ({
    id: s.id,
    treatment: s.treatment,
    status: s.status,
    simulated: s.simulated === 1,
    delta: designSchema.parse(s.params).delta,
    completedAt: s.completedAt,
    rows: Number(s.rows ?? 0),
    participants: Number(s.participants ?? 0),
    declined: Number(s.declined ?? 0),
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
 * depend on it, methods.md §8). Points are the payoffs of the rounds that count (round ≤ L).
 */
export async function creditSheet(session: PanelSession): Promise<CreditLine[]> {
  const rule = session.credit;
  const people = await panelParticipants(session);
  const points = new Map<string, number>();
  const keyOf = new Map(people.map((p) => [p.pseudonym, p.key]));
  for await (const page of panelPages([session], { identified: true })) {
    for (const r of page.rows) {
      if (r.supergame_length !== null && r.round > r.supergame_length) continue;
      const key = keyOf.get(r.pseudonym)!;
      points.set(key, (points.get(key) ?? 0) + r.payoff);
    }
  }
  return people.map((p) => {
    // sums of payoffs with decimals: keep 4 decimals, as the designs do
    const pts = Math.round((points.get(p.key) ?? 0) * 1e4) / 1e4;
    return { key: p.key, pseudonym: p.pseudonym, name: p.name ?? '', email: p.email, studentId: p.studentId ?? '', points: pts, credit: creditFor(rule, pts) };
  });
}

/** The sheet as CSV for a gradebook import: one line per participant, `.` decimals. */
export function creditCsv(lines: readonly CreditLine[], rule: CreditRule): string {
  const paid = rule.kind === 'paid';
  const columns = paid
    ? ['student_id', 'name', 'email', 'pseudonym', 'points', 'payout', 'currency']
    : ['student_id', 'name', 'email', 'pseudonym', 'points', 'credit'];
  const rows = lines.map((l) => ({
    student_id: l.studentId,
    name: l.name,
    email: l.email,
    pseudonym: l.pseudonym,
    points: l.points,
    ...(l.credit.kind === 'paid' ? { payout: l.credit.payout.toFixed(l.credit.decimals), currency: l.credit.currency } : { credit: l.credit.credit }),
  }));
  return Papa.unparse(rows, { columns, newline: '\n', escapeFormulae: true }) + '\n';
}
