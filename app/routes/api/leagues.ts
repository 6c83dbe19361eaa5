// GET /api/v1/leagues?course=<id> — a course's strategy leagues (settings, state, entry counts)
// by id; ?limit (≤ 100) &cursor, like every list of the API. Results: /api/v1/leagues/:leagueId.
import type { Route } from './+types/leagues';
import { type LeagueSummary, listLeagues } from '#app/models/league.server';
import { apiFail, idCursor, idPage, notAllowed, pageParams, parseApiId, requireApiCourse, requireApiToken } from '#app/utils/api.server';

const leagueJson = (l: LeagueSummary) => ({
  id: l.id,
  course_id: l.courseId,
  title: l.title,
  state: l.state,
  design: l.design,
  deadline: l.deadline?.toISOString() ?? null,
  entries: l.entries,
  house_entries: l.houseEntries,
  has_results: l.hasResults,
  created_at: l.createdAt.toISOString(),
  run_at: l.runAt?.toISOString() ?? null,
  published_at: l.publishedAt?.toISOString() ?? null,
});

export async function loader({ request }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const raw = new URL(request.url).searchParams.get('course');
  if (raw === null) apiFail(400, 'bad_request', 'Name the course: /api/v1/leagues?course=<id>.');
  const course = await requireApiCourse(caller, parseApiId(raw, 'course'));
  const { limit, cursor } = pageParams(request, { limit: 50, max: 100 });
  const rows = await listLeagues(course.id, { afterId: idCursor.decode(cursor), limit: limit + 1 });
  return idPage(rows, limit, leagueJson);
}

export const action = notAllowed;
