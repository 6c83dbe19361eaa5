import { Link } from 'react-router';
import type { Route } from './+types/course';
import { Cautions } from '#app/components/cautions';
import { PageHeader } from '#app/components/shells';
import { ButtonLink, DemoBadge } from '#app/components/ui';
import { countByRole } from '#app/models/course.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { ROLE_WORDS } from '#app/utils/format';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role, user } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  return { course, role: user.isAdmin ? ('admin' as const) : role, counts: await countByRole(course.id) };
}

export default function CoursePage({ loaderData }: Route.ComponentProps) {
  const { course, role, counts } = loaderData;
  const canSeeMembers = role === 'instructor' || role === 'assistant' || role === 'admin';
  const canSeeData = role === 'instructor' || role === 'researcher' || role === 'admin';
  return (
    <>
      <PageHeader
        title={course.title}
        eyebrow={
          <span className="flex flex-wrap items-center gap-2">
            <Link to="/courses" className="text-accent-700 underline-offset-4 hover:underline">
              Courses
            </Link>
            <span aria-hidden="true">/</span>
            {[course.institution, course.term].filter(Boolean).join(' · ') || 'Course'}
            {course.isDemo ? <DemoBadge /> : null}
          </span>
        }
      >
        <ButtonLink to={`/courses/${course.id}/sessions`} variant="secondary">
          Sessions
        </ButtonLink>
        <ButtonLink to={`/courses/${course.id}/designs`} variant="secondary">
          Designs
        </ButtonLink>
        <ButtonLink to={`/courses/${course.id}/debrief`} variant="secondary">
          Debrief
        </ButtonLink>
        <ButtonLink to={`/courses/${course.id}/leagues`} variant="secondary">
          Strategy leagues
        </ButtonLink>
        {canSeeMembers ? (
          <ButtonLink to={`/courses/${course.id}/members`} variant="secondary">
            Members
          </ButtonLink>
        ) : null}
        {role === 'instructor' || role === 'admin' ? (
          <ButtonLink to={`/courses/${course.id}/roster`} variant="secondary">
            Roster upload
          </ButtonLink>
        ) : null}
        {canSeeData ? (
          <ButtonLink to={`/courses/${course.id}/data`} variant="secondary">
            Data
          </ButtonLink>
        ) : null}
      </PageHeader>
      <p className="mb-6 text-slate-700">
        Your role: <strong>{ROLE_WORDS[role]}</strong>
      </p>
      <section aria-labelledby="people" className="mb-8">
        <h2 id="people" className="mb-3 text-lg font-semibold">
          People
        </h2>
        <dl className="grid max-w-3xl grid-cols-2 gap-3 sm:grid-cols-4">
          {(['instructor', 'assistant', 'researcher', 'participant'] as const).map((r) => (
            <div key={r} className="rounded-lg border border-slate-200 bg-white p-4">
              <dt className="text-sm text-slate-600">{ROLE_WORDS[r]}s</dt>
              <dd className="num text-2xl font-semibold">{counts[r]}</dd>
            </div>
          ))}
        </dl>
      </section>
      {course.isDemo ? (
        <p className="mb-6 max-w-3xl text-slate-700">
          This course is part of Parley’s demo: the college, the people and every choice in it are invented, and the choices are simulated.
        </p>
      ) : null}
      <Cautions />
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.course.title ?? 'Course'} · Parley` }];
