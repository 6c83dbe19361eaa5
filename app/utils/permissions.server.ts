import { and, eq } from 'drizzle-orm';
import { courseMembers, courses, type CourseRole, users } from '#drizzle/schema';
import { type CurrentUser, requireUser } from './auth.server';
import { db } from './db.server';
import { env } from './env.server';
import { parseId, respondUnless } from './http.server';

export const STAFF_ROLES = ['instructor', 'assistant', 'researcher'] as const satisfies readonly CourseRole[];

export interface CourseAccess {
  user: CurrentUser;
  course: { id: number; title: string; institution: string | null; term: string | null; isDemo: boolean; archivedAt: Date | null };
  /** the caller's role; site admins act as instructors everywhere */
  role: CourseRole;
}

/** Role of a user in a course, or null. */
export async function roleIn(courseId: number, userId: number): Promise<CourseRole | null> {
  const [m] = await db()
    .select({ role: courseMembers.role })
    .from(courseMembers)
    .where(and(eq(courseMembers.courseId, courseId), eq(courseMembers.userId, userId)));
  return m?.role ?? null;
}

/** A user's role in a course: site admins act as instructors in every course (product.md "Roles"). */
export async function courseRoleOf(courseId: number, user: { id: number; isAdmin: boolean }): Promise<CourseRole | null> {
  return user.isAdmin ? 'instructor' : roleIn(courseId, user.id);
}

/**
 * Guard for every course page: unknown course → 404; signed-in but not in one of `roles` → 403.
 * Throws, so the happy path reads straight down.
 */
export async function requireCourseRole(
  request: Request,
  courseIdParam: string | undefined,
  roles: readonly CourseRole[],
): Promise<CourseAccess> {
  const user = await requireUser(request);
  const courseId = parseId(courseIdParam, 'course');
  const [course] = await db()
    .select({
      id: courses.id,
      title: courses.title,
      institution: courses.institution,
      term: courses.term,
      isDemo: courses.isDemo,
      archivedAt: courses.archivedAt,
    })
    .from(courses)
    .where(eq(courses.id, courseId));
  respondUnless(course, 404, 'No such course.');
  const role = await courseRoleOf(courseId, user);
  respondUnless(role, 403, 'You are not a member of this course.');
  respondUnless(roles.includes(role), 403, `Your role in this course (${role}) does not open this page.`);
  return { user, course, role };
}

/** The part of an address after the last @, lower-cased. */
export const emailDomain = (email: string) => email.slice(email.lastIndexOf('@') + 1).toLowerCase();

/**
 * Who may create a course (docs/decisions/023-who-creates-courses.md): site admins, accounts an
 * admin granted, and addresses of an INSTRUCTOR_DOMAINS domain, matched exactly (students often
 * have a subdomain of the staff domain).
 */
export async function mayCreateCourses(user: CurrentUser): Promise<boolean> {
  if (user.isAdmin || env().INSTRUCTOR_DOMAINS.includes(emailDomain(user.email))) return true;
  const [u] = await db().select({ granted: users.mayCreateCourses }).from(users).where(eq(users.id, user.id));
  return u?.granted === true;
}

/** Guard of course creation: 403 with the way to get the right. */
export async function requireCourseCreator(request: Request): Promise<CurrentUser> {
  const user = await requireUser(request);
  respondUnless(await mayCreateCourses(user), 403, 'Your account may not create courses. Ask a site administrator of Parley to allow it.');
  return user;
}
