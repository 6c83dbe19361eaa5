import type { Route } from './+types/debrief-compare';
import { DebriefView } from '#app/components/debrief-view';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { includeParam, loadDebrief, pickEstimate, sessionIdsParam } from '#app/models/debrief.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const ids = sessionIdsParam(new URL(request.url));
  const include = includeParam(new URL(request.url));
  const { sessions, estimates } = await loadDebrief(course.id, ids, { include });
  return { course, sessions, estimates, include, current: pickEstimate(estimates, new URL(request.url)) };
}

export default function DebriefCompare({ loaderData }: Route.ComponentProps) {
  const { course, sessions, estimates, current, include } = loaderData;
  const ids = sessions.map((s) => s.id).join(',');
  return (
    <>
      <PageHeader title="Debrief: sessions side by side" eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/debrief`, label: 'Debrief' }]} />} />
      <p className="mb-6 max-w-3xl text-slate-700">
        {sessions.map((s) => `#${s.id} ${s.treatment} (δ = ${Number(s.delta.toFixed(4))})`).join(' · ')}
      </p>
      <DebriefView courseId={course.id} sessions={sessions} estimates={estimates} current={current} include={include} basePath={`/courses/${course.id}/debrief/compare?sessions=${ids}&`} />
    </>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Debrief: sessions side by side · Parley' }];
