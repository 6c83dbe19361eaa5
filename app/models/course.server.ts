import { createHash, randomBytes } from 'node:crypto';
import { and, asc, count, eq, gt, gte, inArray, isNull, sql } from 'drizzle-orm';
import { courseMails, courseMembers, courses, invitations, users, type CourseRole } from '#drizzle/schema';
import { db } from '#app/utils/db.server';
import { env } from '#app/utils/env.server';
import { INVITATION_DAYS } from '#app/utils/roles';

/** An invitation neither accepted nor revoked. */
const isPending = and(isNull(invitations.acceptedAt), isNull(invitations.revokedAt));

export { INVITATION_DAYS };

export async function listCoursesForUser(userId: number, isAdmin: boolean) {
  const memberCount = db()
    .select({ courseId: courseMembers.courseId, n: count().as('n') })
    .from(courseMembers)
    .groupBy(courseMembers.courseId)
    .as('member_count');
  const mine = db()
    .select({ courseId: courseMembers.courseId, role: courseMembers.role })
    .from(courseMembers)
    .where(eq(courseMembers.userId, userId))
    .as('mine');
  const rows = await db()
    .select({
      id: courses.id,
      title: courses.title,
      institution: courses.institution,
      term: courses.term,
      isDemo: courses.isDemo,
      role: mine.role,
      members: memberCount.n,
      archivedAt: courses.archivedAt,
    })
    .from(courses)
    .leftJoin(mine, eq(mine.courseId, courses.id))
    .leftJoin(memberCount, eq(memberCount.courseId, courses.id))
    .where(isAdmin ? undefined : sql`${mine.role} IS NOT NULL`)
    .orderBy(asc(courses.title));
  return rows.map((r) => ({
    ...r,
    members: Number(r.members ?? 0),
    role: r.role ?? (isAdmin ? ('admin' as const) : null),
  }));
}

export async function createCourse(userId: number, input: { title: string; institution?: string; term?: string }) {
  return db().transaction(async (tx) => {
    const [res] = await tx
      .insert(courses)
      .values({ title: input.title, institution: input.institution || null, term: input.term || null, createdBy: userId });
    const courseId = res.insertId;
    await tx.insert(courseMembers).values({ courseId, userId, role: 'instructor' });
    return courseId;
  });
}

/**
 * The name a course shows for a member: its own roster's name, else the account's name (set by
 * the operator, e.g. the demo seed; a roster never writes it). Use with a join on both tables.
 */
export const memberName = sql<string | null>`COALESCE(${courseMembers.name}, ${users.name})`;

export async function listMembers(courseId: number) {
  return db()
    .select({
      memberId: courseMembers.id,
      userId: users.id,
      email: users.email,
      name: memberName,
      role: courseMembers.role,
      studentId: courseMembers.studentId,
      joinedAt: courseMembers.createdAt,
    })
    .from(courseMembers)
    .innerJoin(users, eq(users.id, courseMembers.userId))
    .where(eq(courseMembers.courseId, courseId))
    .orderBy(asc(users.email));
}

export async function countByRole(courseId: number) {
  const rows = await db()
    .select({ role: courseMembers.role, n: count() })
    .from(courseMembers)
    .where(eq(courseMembers.courseId, courseId))
    .groupBy(courseMembers.role);
  const out: Record<CourseRole, number> = { instructor: 0, assistant: 0, researcher: 0, participant: 0 };
  for (const r of rows) out[r.role] = r.n;
  return out;
}

export async function listPendingInvitations(courseId: number) {
  return db()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      createdAt: invitations.createdAt,
      expiresAt: invitations.expiresAt,
      sentAt: invitations.sentAt,
    })
    .from(invitations)
    .where(and(eq(invitations.courseId, courseId), isPending, gt(invitations.expiresAt, new Date())))
    .orderBy(asc(invitations.email));
}

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

export type InviteResult = { ok: true; token: string; invitationId: number } | { ok: false; field: 'email'; message: string };

/** A new invitation (an earlier pending one to the same address is replaced). */
export async function createInvitation(courseId: number, email: string, role: CourseRole, invitedBy: number): Promise<InviteResult> {
  const normalised = email.trim().toLowerCase();
  const [existing] = await db()
    .select({ role: courseMembers.role })
    .from(courseMembers)
    .innerJoin(users, eq(users.id, courseMembers.userId))
    .where(and(eq(courseMembers.courseId, courseId), eq(users.email, normalised)));
  if (existing)
    return {
      ok: false,
      field: 'email',
      message: `${normalised} is already a member (${existing.role}). Change the role in the table instead.`,
    };
  const token = randomBytes(24).toString('base64url');
  const invitationId = await db().transaction(async (tx) => {
    await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.courseId, courseId), eq(invitations.email, normalised), isPending));
    const [res] = await tx.insert(invitations).values({
      courseId,
      email: normalised,
      role,
      tokenHash: hashToken(token),
      invitedBy,
      expiresAt: new Date(Date.now() + INVITATION_DAYS * 86400_000),
      // not sent until its mail went out (markInvitationSent)
      sentAt: null,
    });
    return res.insertId;
  });
  return { ok: true, token, invitationId };
}

export async function markInvitationSent(invitationId: number) {
  await db().update(invitations).set({ sentAt: new Date() }).where(eq(invitations.id, invitationId));
}

/** A pending invitation of the course, or null. */
export async function findPendingInvitation(courseId: number, invitationId: number) {
  const [inv] = await db()
    .select({ id: invitations.id, email: invitations.email, role: invitations.role })
    .from(invitations)
    .where(and(eq(invitations.id, invitationId), eq(invitations.courseId, courseId), isPending));
  return inv ?? null;
}

/**
 * A fresh link for a pending invitation of the course, for Resend: only the hash of a token is
 * kept, so the old link cannot be sent again. The old link stops working; the validity restarts.
 */
export async function reissueInvitation(courseId: number, invitationId: number) {
  const token = randomBytes(24).toString('base64url');
  const [res] = await db()
    .update(invitations)
    .set({ tokenHash: hashToken(token), sentAt: null, expiresAt: new Date(Date.now() + INVITATION_DAYS * 86400_000) })
    .where(and(eq(invitations.id, invitationId), eq(invitations.courseId, courseId), isPending));
  return res.affectedRows === 1 ? token : null;
}

/**
 * Reserves up to `wanted` of the course's invitation and roster mails for the last 24 hours
 * (INVITES_PER_COURSE_PER_DAY): the course row is locked, so concurrent requests cannot both take
 * the last places. Returns one reservation id per granted recipient, in order; release the id of a
 * mail that then fails, so only mail that went out counts.
 */
export async function reserveCourseMails(courseId: number, sentBy: number, kind: 'invitation' | 'roster', emails: readonly string[]) {
  if (emails.length === 0) return [];
  return db().transaction(async (tx) => {
    await tx.select({ id: courses.id }).from(courses).where(eq(courses.id, courseId)).for('update');
    const [{ n }] = await tx
      .select({ n: count() })
      .from(courseMails)
      .where(and(eq(courseMails.courseId, courseId), gte(courseMails.createdAt, new Date(Date.now() - 86400_000))));
    const granted = emails.slice(0, Math.max(0, env().INVITES_PER_COURSE_PER_DAY - n));
    const ids: number[] = [];
    for (const email of granted) {
      const [res] = await tx.insert(courseMails).values({ courseId, kind, email, sentBy });
      ids.push(res.insertId);
    }
    return ids;
  });
}

export async function releaseCourseMail(reservationId: number) {
  await db().delete(courseMails).where(eq(courseMails.id, reservationId));
}

/** Accounts a site admin allowed to create courses (docs/decisions/023-who-creates-courses.md). */
export async function listCourseCreators() {
  return db()
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .where(eq(users.mayCreateCourses, true))
    .orderBy(asc(users.email));
}

/** Grants the right by address: an account that has not signed in yet is made, as a roster does. */
export async function grantCourseCreation(email: string) {
  const normalised = email.trim().toLowerCase();
  await db()
    .insert(users)
    .values({ email: normalised, mayCreateCourses: true })
    .onDuplicateKeyUpdate({ set: { mayCreateCourses: true } });
}

/** Courses already made stay with their instructors; only new ones are refused. */
export async function revokeCourseCreation(userId: number) {
  const [res] = await db().update(users).set({ mayCreateCourses: false }).where(eq(users.id, userId));
  return res.affectedRows > 0;
}

export async function revokeInvitation(courseId: number, invitationId: number) {
  const [res] = await db()
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(and(eq(invitations.id, invitationId), eq(invitations.courseId, courseId), isNull(invitations.acceptedAt)));
  return res.affectedRows > 0;
}

export async function findInvitation(token: string) {
  const [inv] = await db()
    .select({
      id: invitations.id,
      courseId: invitations.courseId,
      courseTitle: courses.title,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
    })
    .from(invitations)
    .innerJoin(courses, eq(courses.id, invitations.courseId))
    .where(eq(invitations.tokenHash, hashToken(token)));
  return inv ?? null;
}

export type AcceptResult = { ok: true; courseId: number; role: CourseRole } | { ok: false; message: string };

export async function acceptInvitation(token: string, user: { id: number; email: string }): Promise<AcceptResult> {
  return db().transaction(async (tx) => {
    const [inv] = await tx
      .select()
      .from(invitations)
      .where(eq(invitations.tokenHash, hashToken(token)))
      .for('update');
    if (!inv || inv.revokedAt) return { ok: false, message: 'This invitation was withdrawn or replaced by a newer one.' };
    if (inv.acceptedAt) return { ok: false, message: 'This invitation has already been accepted.' };
    if (inv.expiresAt < new Date()) return { ok: false, message: 'This invitation has expired. Ask for a new one.' };
    if (inv.email !== user.email.toLowerCase()) {
      return { ok: false, message: `This invitation was sent to ${inv.email}, but you are signed in as ${user.email}.` };
    }
    await tx
      .insert(courseMembers)
      .values({ courseId: inv.courseId, userId: user.id, role: inv.role })
      .onDuplicateKeyUpdate({ set: { role: inv.role } });
    await tx.update(invitations).set({ acceptedAt: new Date() }).where(eq(invitations.id, inv.id));
    return { ok: true, courseId: inv.courseId, role: inv.role };
  });
}

export type MemberChange = { ok: true; userId: number } | { ok: false; message: string; status: 400 | 404 };

/** Role change and removal keep at least one instructor in the course. */
export async function changeMemberRole(courseId: number, memberId: number, role: CourseRole | null): Promise<MemberChange> {
  return db().transaction(async (tx) => {
    const [m] = await tx
      .select({ role: courseMembers.role, userId: courseMembers.userId })
      .from(courseMembers)
      .where(and(eq(courseMembers.id, memberId), eq(courseMembers.courseId, courseId)))
      .for('update');
    if (!m) return { ok: false, status: 404, message: 'That member is not in this course.' };
    if (m.role === 'instructor' && role !== 'instructor') {
      const [{ n }] = await tx
        .select({ n: count() })
        .from(courseMembers)
        .where(and(eq(courseMembers.courseId, courseId), inArray(courseMembers.role, ['instructor'])));
      if (n <= 1) return { ok: false, status: 400, message: 'A course needs at least one instructor. Make someone else instructor first.' };
    }
    if (role === null) await tx.delete(courseMembers).where(eq(courseMembers.id, memberId));
    else await tx.update(courseMembers).set({ role }).where(eq(courseMembers.id, memberId));
    return { ok: true, userId: m.userId };
  });
}

/** Courses among `ids` with ids after `afterId`, ascending (the research API's list of a token's courses). */
export async function coursesAfter(ids: readonly number[], afterId: number) {
  if (ids.length === 0) return [];
  return db()
    .select({ id: courses.id, title: courses.title, institution: courses.institution, term: courses.term, isDemo: courses.isDemo })
    .from(courses)
    .where(and(inArray(courses.id, [...ids]), gt(courses.id, afterId)))
    .orderBy(asc(courses.id));
}

/** Accounts on this Parley (the site admin's overview). */
export async function countUsers(): Promise<number> {
  const [{ n }] = await db().select({ n: count() }).from(users);
  return n;
}
