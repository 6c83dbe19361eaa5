import { data } from 'react-router';
import type { Route } from './+types/compare';
import { DebriefView } from '#app/components/debrief-view';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { ButtonLink, Notice } from '#app/components/ui';
import { debriefGrouping, pickEstimate } from '#app/models/debrief.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { debriefFromUrl } from './from-url.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const url = new URL(request.url);
  const { ids, include, sessions, estimates } = await debriefFromUrl(course.id, url);
  const { separate, grouping } = debriefGrouping(sessions, url);
  if (!grouping.ok) {
    // Pooling sessions that ran different games under one name would mislead: refuse, and offer
    // to show them apart (the researcher's explicit choice).
    return data(
      { course, ids, include, refusal: grouping.message, sessions: null, estimates: [], current: null, separated: [] as string[] },
      { status: 409 },
    );
  }
  return {
    course,
    ids,
    include,
    refusal: null,
    sessions,
    estimates,
    current: pickEstimate(estimates, url),
    separated: separate ? grouping.separated.map((c) => c.name) : [],
  };
}

export default function DebriefCompare({ loaderData }: Route.ComponentProps) {
  const { course, ids, include, refusal, sessions, estimates, current, separated } = loaderData;
  const header = (
    <PageHeader
      title="Debrief: sessions side by side"
      eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/debrief`, label: 'Debrief' }]} />}
    />
  );
  const list = ids.join(',');
  if (refusal !== null || sessions === null) {
    return (
      <>
        {header}
        <div className="flex max-w-3xl flex-col gap-4">
          <Notice tone="warn" title="These sessions cannot be pooled">
            {refusal}
          </Notice>
          <p className="text-slate-700">
            The side-by-side Debrief pools sessions of the same treatment. Sessions are the same treatment when their payoffs, δ and
            termination are the same, whatever their names. You can look at these sessions as separate treatments instead.
          </p>
          <div className="flex flex-wrap gap-2">
            <ButtonLink
              to={`/courses/${course.id}/debrief/compare?sessions=${list}&treatments=separate${include === 'all' ? '&include=all' : ''}`}
            >
              Show them as separate treatments
            </ButtonLink>
            <ButtonLink to={`/courses/${course.id}/debrief`} variant="secondary">
              Choose other sessions
            </ButtonLink>
          </div>
        </div>
      </>
    );
  }
  const separate = separated.length > 0;
  return (
    <>
      {header}
      <p className="mb-6 max-w-3xl text-slate-700">
        {sessions.map((s) => `#${s.id} ${s.treatment} (δ = ${Number(s.delta.toFixed(4))})`).join(' · ')}
      </p>
      {separate ? (
        <div className="mb-6 max-w-3xl">
          <Notice tone="info" title="Separate treatments">
            Sessions called {separated.map((n) => `“${n}”`).join(', ')} ran different treatments: shown as separate treatments, each with
            its own parameters.
          </Notice>
        </div>
      ) : null}
      <DebriefView
        courseId={course.id}
        sessions={sessions}
        estimates={estimates}
        current={current}
        separate={separate}
        include={include}
        basePath={`/courses/${course.id}/debrief/compare?sessions=${list}${separate ? '&treatments=separate' : ''}&`}
      />
    </>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Debrief: sessions side by side · Parley' }];
