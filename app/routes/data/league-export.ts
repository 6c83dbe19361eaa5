// A league's files (docs/formats/league.md): entries.csv, results.csv (the ranking), matrix.csv
// (pairwise per-round values), evolution.csv (shares by generation), league.json (everything, the
// automata in the parley-strategy format). Researchers get participants' entries as "Entry <id>".
import type { Route } from './+types/league-export';
import { entriesCsv, evolutionCsv, leagueJson, matrixCsv, resultsCsv } from '#app/lib/league-export';
import { getLeague, listEntries } from '#app/models/league.server';
import { parseId, respond, respondUnless } from '#app/utils/http.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

const FILES = ['entries.csv', 'results.csv', 'matrix.csv', 'evolution.csv', 'league.json'] as const;
type File = (typeof FILES)[number];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const league = await getLeague(course.id, parseId(params.leagueId, 'league'));
  respondUnless(league, 404, 'No such league in this course.');
  const file = params.file as File;
  if (!FILES.includes(file)) respond(404, `No such file: ${FILES.join(', ')} are.`);
  const showNames = role !== 'researcher';
  const results = league.results;
  const needsResults = file === 'results.csv' || file === 'matrix.csv' || file === 'evolution.csv';
  if (needsResults && !results) respond(409, 'This league has not been run yet: there are no results to download.');
  const name = file === 'league.json' ? `parley-league-${league.id}.json` : `parley-league-${league.id}-${file}`;
  const headers = (type: string): ResponseInit => ({
    headers: { 'content-type': type, 'content-disposition': `attachment; filename="${name}"`, 'cache-control': 'no-store' },
  });
  const csv = 'text/csv; charset=utf-8';
  if (file === 'league.json') {
    const entries = (await listEntries(league.id)).map((e) => ({ entryId: e.id, name: e.name, house: e.house, strategy: e.strategy }));
    return new Response(
      JSON.stringify(leagueJson(league, entries, results, showNames), null, 2),
      headers('application/json; charset=utf-8'),
    );
  }
  if (file === 'entries.csv') {
    const entries = (await listEntries(league.id)).map((e) => ({ entryId: e.id, name: e.name, house: e.house, strategy: e.strategy }));
    return new Response(entriesCsv(entries, showNames), headers(csv));
  }
  if (file === 'results.csv') return new Response(resultsCsv(results!, showNames), headers(csv));
  if (file === 'matrix.csv') return new Response(matrixCsv(results!, showNames), headers(csv));
  return new Response(evolutionCsv(results!, showNames), headers(csv));
}
