// The credit sheet of a session as CSV for a gradebook import (instructors only; logged).
import type { Route } from './+types/credit';
import { creditCsv, creditSheet, logExport } from '#app/models/exports.server';
import { findPanelSession } from '#app/models/panel-export.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  const session = await findPanelSession(course.id, parseId(params.sessionId, 'session'));
  respondUnless(session, 404, 'No such session in this course.');
  const lines = await creditSheet(session);
  await logExport(course.id, session.id, user.id, 'credit-sheet');
  return new Response(creditCsv(lines, session.credit), {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="parley-session-${session.id}-credit.csv"`,
      'cache-control': 'no-store',
    },
  });
}
