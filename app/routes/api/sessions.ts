// GET /api/v1/courses/:courseId/sessions — the course's sessions by id; ?limit (≤ 100) &cursor.
import type { Route } from './+types/sessions';
import { sessionsAfter } from '#app/models/session.server';
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

export async function loader({ request, params }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const course = await requireApiCourse(caller, parseApiId(params.courseId, 'course'));
  const { limit, cursor } = pageParams(request, { limit: 50, max: 100 });
  const rows = await sessionsAfter(course.id, idCursor.decode(cursor), limit + 1);
  return idPage(rows, limit, sessionJson);
}

export const action = notAllowed;
