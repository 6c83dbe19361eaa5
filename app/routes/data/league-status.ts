// GET: a league's state and run status as JSON; the league page polls it while a run is queued or running.
import { data } from 'react-router';
import type { Route } from './+types/league-status';
import { leagueStatus } from '#app/models/league.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const id = Number(params.leagueId);
  const status = Number.isSafeInteger(id) && id > 0 ? await leagueStatus(course.id, id) : null;
  if (!status) return data({ ok: false as const, message: 'No such league in this course.' }, { status: 404 });
  return data(status, { headers: { 'Cache-Control': 'no-store' } });
}
