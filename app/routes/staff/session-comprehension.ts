import type { Route } from './+types/session-comprehension';
import { comprehensionQuestions } from '#app/lib/comprehension';
import { checkStatus } from '#app/models/comprehension.server';
import { getSession } from '#app/models/live.server';
import { parseId } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

// Who has not passed the comprehension check yet, for the Conductor (instructors and assistants:
// it names people, as the Floor's names do). Polled as JSON while the Conductor is open.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor', 'assistant']);
  const session = await getSession(parseId(params.sessionId, 'session'));
  if (!session || session.courseId !== course.id)
    return Response.json({ error: { code: 'not-found', message: 'No such session.' } }, { status: 404 });
  const topics = Object.fromEntries(comprehensionQuestions(session.design).map((q, i) => [q.id, `question ${i + 1} (${q.topic})`]));
  const rows = (await checkStatus(course.id, session.id)).map((r) => ({ ...r, lastWrong: r.lastWrong.map((id) => topics[id] ?? id) }));
  return Response.json({ enabled: session.design.comprehension, rows, now: Date.now() }, { headers: { 'Cache-Control': 'no-store' } });
}
