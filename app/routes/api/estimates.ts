// GET /api/v1/courses/:courseId/estimates — stored strategy-frequency estimations, newest last
// by id; ?limit (≤ 100) &cursor.
import type { Route } from './+types/estimates';
import { estimatesAfter } from '#app/models/estimate.server';
import { idCursor, idPage, notAllowed, pageParams, parseApiId, requireApiCourse, requireApiToken } from '#app/utils/api.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const course = await requireApiCourse(caller, parseApiId(params.courseId, 'course'));
  const { limit, cursor } = pageParams(request, { limit: 20, max: 100 });
  const rows = await estimatesAfter(course.id, idCursor.decode(cursor), limit + 1);
  return idPage(rows, limit, (e) => ({
    id: e.id,
    status: e.status,
    progress: e.progress,
    total: e.total,
    request: e.request,
    result: e.result,
    error: e.error,
    created_at: e.createdAt.toISOString(),
    finished_at: e.finishedAt?.toISOString() ?? null,
  }));
}

export const action = notAllowed;
