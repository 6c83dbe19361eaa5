// GET: an estimation's status, progress and (when done) result, as JSON; the Debrief polls it.
import { data } from 'react-router';
import type { Route } from './+types/estimate-status';
import { getEstimate } from '#app/models/estimate.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const id = Number(params.estimateId);
  const estimate = Number.isSafeInteger(id) && id > 0 ? await getEstimate(course.id, id) : null;
  if (!estimate) return data({ ok: false as const, message: 'No such estimation in this course.' }, { status: 404 });
  return data(estimate, { headers: { 'Cache-Control': 'no-store' } });
}
