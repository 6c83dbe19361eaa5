// The panel's codebook as CSV (every column: meaning, type, values), beside the panel.
import type { Route } from './+types/codebook';
import { codebookCsv } from '#app/lib/panel-codebook';
import { requireCourseRole } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { role } = await requireCourseRole(request, params.courseId, ['instructor', 'researcher']);
  const identified = new URL(request.url).searchParams.get('identified') === '1' && role === 'instructor';
  return new Response(codebookCsv(identified), {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="parley-codebook${identified ? '-identified' : ''}.csv"`,
    },
  });
}
