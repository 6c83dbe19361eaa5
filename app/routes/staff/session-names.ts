import { data } from 'react-router';
import type { Route } from './+types/session-names';
import { getSession } from '#app/models/live.server';
import { namesOf } from '#app/models/session.server';
import { parseId } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

// Names behind the pseudonyms, for the Floor's "show names" (instructors and assistants only).
export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor', 'assistant']);
  const session = await getSession(parseId(params.sessionId, 'session'));
  if (!session || session.courseId !== course.id)
    return data({ error: { code: 'not-found', message: 'No such session.' } }, { status: 404 });
  const rows = await namesOf(session.id);
  return data(
    { names: Object.fromEntries(rows.map((r) => [r.participantKey, { name: r.name, email: r.email }])) },
    { headers: { 'Cache-Control': 'no-store' } },
  );
}
