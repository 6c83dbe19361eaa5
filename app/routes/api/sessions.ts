// GET /api/v1/courses/:courseId/sessions — the course's sessions by id; ?limit (≤ 100) &cursor.
import { and, asc, eq, gt } from 'drizzle-orm';
import type { Route } from './+types/sessions';
import {
  idCursor,
  idPage,
  notAllowed,
  pageParams,
  parseApiId,
  requireApiCourse,
  requireApiToken,
  sessionJson,
} from '#app/utils/api.server';
import { db } from '#app/utils/db.server';
import { sessions } from '#drizzle/schema';

export async function loader({ request, params }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const course = await requireApiCourse(caller, parseApiId(params.courseId, 'course'));
  const { limit, cursor } = pageParams(request, { limit: 50, max: 100 });
  const rows = await db()
    .select()
    .from(sessions)
    .where(and(eq(sessions.courseId, course.id), gt(sessions.id, idCursor.decode(cursor))))
    .orderBy(asc(sessions.id))
    .limit(limit + 1);
  return idPage(rows, limit, sessionJson);
}

export const action = notAllowed;
