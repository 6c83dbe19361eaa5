// Bearer tokens for the research API (/api/v1): shown once, stored as SHA-256, scoped to courses,
// revocable, last use recorded.
import { createHash, randomBytes } from 'node:crypto';
import { and, asc, desc, eq, inArray, isNull } from 'drizzle-orm';
import { db } from '#app/utils/db.server';
import { apiTokens, courseMembers, courses } from '#drizzle/schema';

/** Roles that may hold tokens (product.md, "Roles": de-identified panel, API tokens). */
export const API_ROLES = ['instructor', 'researcher'] as const;

export const TOKEN_PREFIX = 'prl_';

export const hashApiToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

/** Courses a user may scope a token to: where they are instructor or researcher (admins: all). */
export async function tokenCourseChoices(userId: number, isAdmin: boolean) {
  if (isAdmin) return db().select({ id: courses.id, title: courses.title }).from(courses).orderBy(asc(courses.title));
  return db()
    .select({ id: courses.id, title: courses.title })
    .from(courseMembers)
    .innerJoin(courses, eq(courses.id, courseMembers.courseId))
    .where(and(eq(courseMembers.userId, userId), inArray(courseMembers.role, [...API_ROLES])))
    .orderBy(asc(courses.title));
}

export async function createApiToken(userId: number, name: string, courseIds: number[]) {
  const token = TOKEN_PREFIX + randomBytes(32).toString('base64url');
  await db()
    .insert(apiTokens)
    .values({
      userId,
      name,
      tokenHash: hashApiToken(token),
      prefix: token.slice(0, 12),
      courseIds: [...new Set(courseIds)].sort((a, b) => a - b),
    });
  return token;
}

export async function listApiTokens(userId: number) {
  return db()
    .select({
      id: apiTokens.id,
      name: apiTokens.name,
      prefix: apiTokens.prefix,
      courseIds: apiTokens.courseIds,
      createdAt: apiTokens.createdAt,
      lastUsedAt: apiTokens.lastUsedAt,
      revokedAt: apiTokens.revokedAt,
    })
    .from(apiTokens)
    .where(eq(apiTokens.userId, userId))
    .orderBy(desc(apiTokens.id));
}

export async function revokeApiToken(userId: number, id: number) {
  const [res] = await db()
    .update(apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(apiTokens.id, id), eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)));
  return res.affectedRows > 0;
}

/** The token's row by its hash (revoked ones too, so the caller can say why it fails). */
export async function findApiToken(token: string) {
  const [row] = await db()
    .select({ id: apiTokens.id, userId: apiTokens.userId, courseIds: apiTokens.courseIds, revokedAt: apiTokens.revokedAt })
    .from(apiTokens)
    .where(eq(apiTokens.tokenHash, hashApiToken(token)));
  return row ?? null;
}

export async function touchApiToken(id: number) {
  await db().update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, id));
}
