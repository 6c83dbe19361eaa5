import type { Route } from './+types/session';
import { DebriefView } from '#app/components/debrief-view';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { includeParam, loadDebrief, pickEstimate } from '#app/models/debrief.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const sessionId = parseId(params.sessionId, 'session');
  const include = includeParam(new URL(request.url));
  const debrief = await loadDebrief(course.id, [sessionId], { include });
  respondUnless(debrief, 404, 'No such session in this course.');
  const { sessions, estimates } = debrief;
  return { course, sessions, estimates, include, current: pickEstimate(estimates, new URL(request.url)) };
}

export default function DebriefSession({ loaderData }: Route.ComponentProps) {
  const { course, sessions, estimates, current, include } = loaderData;
  const s = sessions[0];
  return (
    <>
      <PageHeader
        title={`Debrief: ${s.treatment}`}
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/debrief`, label: 'Debrief' }]} />}
      />
      <dl className="mb-6 grid max-w-5xl grid-cols-2 gap-3 sm:grid-cols-4 lg:grid-cols-7">
        {[
          ['Session', `#${s.id}`],
          ['Participants', String(s.debrief.participants)],
          ['Supergames', String(s.debrief.bySupergame.length)],
          ['δ', String(Number(s.delta.toFixed(4)))],
          ['Cooperation', s.debrief.overall.rate === null ? '–' : `${(s.debrief.overall.rate * 100).toFixed(1)} %`],
          [include === 'all' ? 'Choices (every origin)' : 'Own choices counted', s.debrief.counts.used.toLocaleString('en-US')],
          [
            'Left out',
            (s.debrief.counts.timeout + s.debrief.counts.computer_seat + s.debrief.counts.unpaid_round + s.unfinished).toLocaleString(
              'en-US',
            ),
          ],
        ].map(([k, v]) => (
          <div key={k} className="rounded-lg border border-slate-200 bg-white p-3">
            <dt className="text-sm text-slate-600">{k}</dt>
            <dd className="num text-xl font-semibold">{v}</dd>
          </div>
        ))}
      </dl>
      <DebriefView
        courseId={course.id}
        sessions={sessions}
        estimates={estimates}
        current={current}
        include={include}
        basePath={`/courses/${course.id}/debrief/${s.id}?`}
      />
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Debrief ${data?.sessions[0]?.treatment ?? ''} · Parley` }];
