import { and, asc, count, desc, eq, gt, inArray } from 'drizzle-orm';
import { instructionProblems } from '#app/lib/instructions';
import { normaliseSeed } from '#app/lib/rng';
import { versionedName } from '#app/lib/treatment';
import { db } from '#app/utils/db.server';
import { courseMembers, designs, sessionParticipants, sessions, users } from '#drizzle/schema';
import { memberName } from './course.server';
import { newJoinCode, newSeed } from './live.server';
import { type Session, sessionColumns, toSession } from './session-row.server';

export async function listSessions(courseId: number) {
  const joined = db()
    .select({ sessionId: sessionParticipants.sessionId, n: count().as('n') })
    .from(sessionParticipants)
    .groupBy(sessionParticipants.sessionId)
    .as('joined');
  const rows = await db()
    .select({
      id: sessions.id,
      treatment: sessions.treatment,
      status: sessions.status,
      joinCode: sessions.joinCode,
      simulated: sessions.simulated,
      createdAt: sessions.createdAt,
      startedAt: sessions.startedAt,
      completedAt: sessions.completedAt,
      currentSupergame: sessions.currentSupergame,
      participants: joined.n,
    })
    .from(sessions)
    .leftJoin(joined, eq(joined.sessionId, sessions.id))
    .where(eq(sessions.courseId, courseId))
    // newest first by id: the demo's sessions carry invented dates that may lie ahead of today
    .orderBy(desc(sessions.id));
  // A join code is shown only while it admits anyone: once a session is over, it is history.
  const admitting = new Set(['open', 'running', 'paused']);
  return rows.map((r) => ({
    ...r,
    joinCode: admitting.has(r.status) ? r.joinCode : null,
    participants: Number(r.participants ?? 0),
  }));
}

export type OpenResult = { ok: true; sessionId: number } | { ok: false; field: string; message: string };

/** A new draft session with the design frozen into it, a fresh join code and a seed. */
export async function createSessionFromDesign(opts: {
  courseId: number;
  designId: number;
  userId: number;
  seed: string | null;
  admission: 'roster' | 'open';
  emailDomain: string | null;
}): Promise<OpenResult> {
  let seed: number;
  try {
    seed = opts.seed ? normaliseSeed(/^\d+$/.test(opts.seed) ? Number(opts.seed) : opts.seed) : newSeed();
  } catch (error) {
    return { ok: false, field: 'seed', message: error instanceof Error ? error.message : 'That seed cannot be used.' };
  }
  for (let attempt = 0; attempt < 5; attempt++) {
    try {
      // The design row is locked while the session copies it: a save of the design waits, then
      // finds the session and refuses (updateDesign), so the copy is what the design shows.
      const opened = await db().transaction(async (tx): Promise<OpenResult> => {
        const [d] = await tx
          .select({ name: designs.name, version: designs.version, params: designs.params, archivedAt: designs.archivedAt })
          .from(designs)
          .where(and(eq(designs.courseId, opts.courseId), eq(designs.id, opts.designId)))
          .for('update');
        if (!d) return { ok: false, field: 'designId', message: 'Choose a design of this course.' };
        if (d.archivedAt) return { ok: false, field: 'designId', message: 'That design is archived; restore it first.' };
        // Instructions that say another δ or other points than the design plays would mislead the
        // room (docs/decisions/028): refused here, inside the lock, so a save in between cannot slip past.
        const problems = instructionProblems(d.params);
        if (problems.length) {
          return {
            ok: false,
            field: 'designId',
            message: `The instructions of “${d.name}” do not match its parameters: ${problems.join(' ')} Edit the design (or make a new version) before opening a session.`,
          };
        }
        const [res] = await tx.insert(sessions).values({
          courseId: opts.courseId,
          designId: opts.designId,
          treatment: versionedName(d.name, d.version).slice(0, 120),
          params: d.params,
          seed,
          joinCode: newJoinCode(),
          status: 'draft',
          admission: opts.admission,
          emailDomain: opts.emailDomain,
          createdBy: opts.userId,
        });
        return { ok: true, sessionId: res.insertId };
      });
      return opened;
    } catch (error) {
      // a join code collision: draw another
      if (!(error instanceof Error && /Duplicate entry/.test(error.message + String((error as { cause?: unknown }).cause)))) throw error;
    }
  }
  throw new Error('could not draw a free join code');
}

export async function findByJoinCode(code: string) {
  const [s] = await db()
    .select({
      id: sessions.id,
      courseId: sessions.courseId,
      status: sessions.status,
      admission: sessions.admission,
      emailDomain: sessions.emailDomain,
    })
    .from(sessions)
    .where(and(eq(sessions.joinCode, code.toUpperCase()), inArray(sessions.status, ['open', 'running', 'paused', 'complete'])));
  return s ?? null;
}

export async function setConsent(sessionId: number, userId: number, consent: boolean) {
  await db()
    .update(sessionParticipants)
    .set({ consent: consent ? 1 : 0, consentAt: new Date() })
    .where(and(eq(sessionParticipants.sessionId, sessionId), eq(sessionParticipants.userId, userId)));
}

/** Names and e-mails behind the pseudonyms, for staff who ask for them on the Floor. */
export async function namesOf(sessionId: number) {
  return db()
    .select({
      participantKey: sessionParticipants.participantKey,
      pseudonym: sessionParticipants.pseudonym,
      name: memberName,
      email: users.email,
    })
    .from(sessionParticipants)
    .innerJoin(users, eq(users.id, sessionParticipants.userId))
    .innerJoin(sessions, eq(sessions.id, sessionParticipants.sessionId))
    .leftJoin(courseMembers, and(eq(courseMembers.userId, sessionParticipants.userId), eq(courseMembers.courseId, sessions.courseId)))
    .where(eq(sessionParticipants.sessionId, sessionId));
}

/** Sessions a user took part in, newest first (the participant's home page). */
export async function sessionsOfParticipant(userId: number) {
  return db()
    .select({
      id: sessions.id,
      courseId: sessions.courseId,
      treatment: sessions.treatment,
      status: sessions.status,
      pseudonym: sessionParticipants.pseudonym,
    })
    .from(sessionParticipants)
    .innerJoin(sessions, eq(sessions.id, sessionParticipants.sessionId))
    .where(eq(sessionParticipants.userId, userId))
    .orderBy(desc(sessions.createdAt))
    .limit(20);
}

/** A course's sessions with ids after `afterId`, ascending, at most `limit` (the research API's pages). */
export async function sessionsAfter(courseId: number, afterId: number, limit: number): Promise<Session[]> {
  const rows = await db()
    .select(sessionColumns)
    .from(sessions)
    .where(and(eq(sessions.courseId, courseId), gt(sessions.id, afterId)))
    .orderBy(asc(sessions.id))
    .limit(limit);
  return rows.map(toSession);
}
