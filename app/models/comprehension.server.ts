// The comprehension check's attempts (docs/decisions/028): written by the participant's check page,
// read by the Conductor. Scoped by session and user; never exported.
import { and, asc, eq, sql } from 'drizzle-orm';
import { db } from '#app/utils/db.server';
import { comprehensionAttempts, courseMembers, sessionParticipants, users } from '#drizzle/schema';
import { memberName } from './course.server';

/** The questions are on screen: the Conductor now lists this person as not yet passed. */
export async function markCheckShown(sessionId: number, userId: number) {
  await db()
    .insert(comprehensionAttempts)
    .values({ sessionId, userId, attempts: 0, updatedAt: new Date() })
    .onDuplicateKeyUpdate({ set: { sessionId: sql`session_id` } });
}

/** One answer sent: counted, with the questions it got wrong; a right one records the pass (once). */
export async function recordAttempt(sessionId: number, userId: number, wrong: readonly string[]) {
  const now = new Date();
  const passed = wrong.length === 0;
  await db()
    .insert(comprehensionAttempts)
    .values({ sessionId, userId, attempts: 1, lastWrong: wrong.join(',') || null, updatedAt: now, passedAt: passed ? now : null })
    .onDuplicateKeyUpdate({
      set: {
        attempts: sql`attempts + 1`,
        lastWrong: wrong.join(',') || null,
        updatedAt: now,
        ...(passed ? { passedAt: sql`coalesce(passed_at, ${now})` } : {}),
      },
    });
}

export async function hasPassed(sessionId: number, userId: number): Promise<boolean> {
  const [row] = await db()
    .select({ passedAt: comprehensionAttempts.passedAt })
    .from(comprehensionAttempts)
    .where(and(eq(comprehensionAttempts.sessionId, sessionId), eq(comprehensionAttempts.userId, userId)));
  return Boolean(row?.passedAt);
}

export interface CheckRow {
  userId: number;
  name: string;
  attempts: number;
  lastWrong: string[];
  passed: boolean;
  joined: boolean;
  /** ms since epoch of the last answer (or of the questions being shown) */
  updatedAt: number;
}

/** Everyone who saw the questions of this session, those not yet passed first. */
export async function checkStatus(courseId: number, sessionId: number): Promise<CheckRow[]> {
  const rows = await db()
    .select({
      userId: comprehensionAttempts.userId,
      name: memberName,
      email: users.email,
      attempts: comprehensionAttempts.attempts,
      lastWrong: comprehensionAttempts.lastWrong,
      passedAt: comprehensionAttempts.passedAt,
      createdAt: comprehensionAttempts.createdAt,
      updatedAt: comprehensionAttempts.updatedAt,
      joined: sessionParticipants.id,
    })
    .from(comprehensionAttempts)
    .innerJoin(users, eq(users.id, comprehensionAttempts.userId))
    .leftJoin(courseMembers, and(eq(courseMembers.courseId, courseId), eq(courseMembers.userId, comprehensionAttempts.userId)))
    .leftJoin(
      sessionParticipants,
      and(eq(sessionParticipants.sessionId, comprehensionAttempts.sessionId), eq(sessionParticipants.userId, comprehensionAttempts.userId)),
    )
    .where(eq(comprehensionAttempts.sessionId, sessionId))
    .orderBy(asc(comprehensionAttempts.createdAt));
  return rows
    .map((r) => ({
      userId: r.userId,
      name: r.name ?? r.email,
      attempts: r.attempts,
      lastWrong: r.lastWrong ? r.lastWrong.split(',') : [],
      passed: r.passedAt !== null,
      joined: r.joined !== null,
      updatedAt: (r.updatedAt ?? r.createdAt).getTime(),
    }))
    .sort((a, b) => Number(a.passed) - Number(b.passed));
}
