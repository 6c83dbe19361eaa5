// GET /api/v1/leagues/:leagueId — one league: settings, entries (automata in the parley-strategy
// format) and, once run, its results (docs/formats/league.md). Participants' entries are named
// "Entry <id>": the API carries no personal data.
import type { Route } from './+types/league';
import { leagueJson } from '#app/lib/league-export';
import { getLeague, leagueCourseId, listEntries } from '#app/models/league.server';
import { apiFail, apiJson, notAllowed, parseApiId, requireApiCourse, requireApiToken } from '#app/utils/api.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const id = parseApiId(params.leagueId, 'league');
  const courseId = await leagueCourseId(id);
  if (courseId === null) apiFail(404, 'not_found', 'No such league.');
  await requireApiCourse(caller, courseId);
  const league = (await getLeague(courseId, id))!;
  const entries = (await listEntries(id)).map((e) => ({ entryId: e.id, name: e.name, house: e.house, strategy: e.strategy }));
  return apiJson({ data: { course_id: courseId, ...leagueJson(league, entries, league.results, false) } });
}

export const action = notAllowed;
