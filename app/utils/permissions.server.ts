import { and, eq } from 'drizzle-orm';
import { courseMembers, courses, type CourseRole, users } from '#drizzle/schema';
import { type CurrentUser, requireUser } from './auth.server';
import { db } from './db.server';
import { env } from './env.server';

export const STAFF_ROLES = ['instructor', 'assistant', 'researcher'] as const satisfies readonly CourseRole[];

export interface CourseAccess {
  user: CurrentUser;
  course: { id: number; title: string; institution: string | null; term: string | null; isDemo: boolean; archivedAt: Date | null };
  /** the caller's role; site admins act as instructors everywhere */
  role: CourseRole;
}

export function parseId(raw: string | undefined): number {
  const id = Number(raw);
  if (!raw || !Number.isSafeInteger(id) || id <= 0) throw new Response('No such course.', { status: 404 });
  return id;
}

/** Role of a user in a course, or null. */
export async function roleIn(courseId: number, userId: number): Promise<CourseRole | null> {
  const [m] = await db()
    .select({ role: courseMembers.role })
    .from(courseMembers)
    .where(and(eq(courseMembers.courseId, courseId), eq(courseMembers.userId, userId)));
  return m?.role ?? null;
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
  const courseId = parseId(courseIdParam);
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
  if (!course) throw new Response('No such course.', { status: 404 });
  const role: CourseRole | null = user.isAdmin ? 'instructor' : await roleIn(courseId, user.id);
  if (!role || !roles.includes(role)) {
    throw new Response(role ? `Your role in this course (${role}) does not open this page.` : 'You are not a member of this course.', {
      status: 403,
    });
  }
  return { user, course: { ...course, isDemo: course.isDemo === 1 }, role };
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
  return u?.granted === 1;
}

/** Guard of course creation: 403 with the way to get the right. */
export async function requireCourseCreator(request: Request): Promise<CurrentUser> {
  const user = await requireUser(request);
  if (!(await mayCreateCourses(user))) {
    throw new Response('Your account may not create courses. Ask a site administrator of Parley to allow it.', { status: 403 });
  }
  return user;
}
