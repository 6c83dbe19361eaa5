// GET: the data behind one Debrief chart as CSV (the one writer, app/lib/csv.ts), for the sessions named in
// ?sessions=1,2 (and ?include=all when the page's switch is on), or for a stored estimation
// (?estimate=ID, chart "strategies"). De-identified, without participants who declined research use.
import { z } from 'zod';
import type { Route } from './+types/csv';
import { csvLines } from '#app/lib/csv';
import { CHART_IDS, chartTable, type Table, tableColumns } from '#app/lib/debrief-tables';
import { getEstimate } from '#app/models/estimate.server';
import { respondUnless } from '#app/utils/http.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { debriefFromUrl } from './from-url.server';

const chartSchema = z.enum(CHART_IDS as [string, ...string[]]);

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const chart = chartSchema.safeParse(params.chart);
  respondUnless(chart.success, 404, `No chart "${params.chart}". Charts: ${CHART_IDS.join(', ')}.`);
  const url = new URL(request.url);
  let rows: Table;
  let name: string;
  if (chart.data === 'strategies') {
    const id = Number(url.searchParams.get('estimate'));
    const e = Number.isSafeInteger(id) && id > 0 ? await getEstimate(course.id, id) : null;
    respondUnless(e, 404, 'No such estimation in this course.');
    respondUnless(e.result, 409, 'This estimation has not finished yet.');
    rows = e.result.groups.flatMap((g) =>
      g.strategies.map((s, k) => ({
        treatment: g.group,
        sessions: g.sessions.join(' '),
        strategy: s,
        share: g.shares[k],
        bootstrap_se: g.se ? g.se[k] : null,
        participants_assigned: g.assigned[k],
        participants_expected: g.expected[k],
        beta: g.beta,
        gamma: Number.isFinite(g.gamma) ? g.gamma : null,
        log_likelihood: g.logLik,
        subjects: g.subjects,
        choices: g.choices,
        window: e.result!.window,
        B: e.result!.bootstrap,
        seed: e.result!.seed,
      })),
    );
    name = `estimate-${e.id}-strategies`;
  } else {
    // A download leaves Parley: participants who declined research use are left out
    // (docs/decisions/026); the page's switch (`include`) decides which choices count.
    const { ids, sessions } = await debriefFromUrl(course.id, url, { research: true });
    rows = chartTable(chart.data as Exclude<(typeof CHART_IDS)[number], 'strategies'>, sessions);
    name = `sessions-${ids.join('-')}-${chart.data}`;
  }
  return new Response(csvLines(rows, tableColumns(rows)), {
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="${name}.csv"`,
      'Cache-Control': 'no-store',
    },
  });
}
