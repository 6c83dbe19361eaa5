import { Link } from 'react-router';
import type { Route } from './+types/courses';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { PageHeader } from '#app/components/shells';
import { DemoBadge } from '#app/components/ui';
import { listCoursesForUser } from '#app/models/course.server';
import { requireUser } from '#app/utils/auth.server';
import { ROLE_WORDS } from '#app/utils/format';
import { mayCreateCourses } from '#app/utils/permissions.server';

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const courses = await listCoursesForUser(user.id, user.isAdmin);
  return { courses: courses.map((c) => ({ ...c, role: c.role ?? 'participant' })), canCreate: await mayCreateCourses(user) };
}

type CourseRow = Route.ComponentProps['loaderData']['courses'][number];
const col = staffColumnHelper<CourseRow>();
const columns = col.columns([
  col.accessor('title', {
    header: 'Course',
    cell: (info) => {
      const c = info.row.original;
      return (
        <span className="flex flex-wrap items-center gap-2">
          {c.role === 'participant' ? (
            <span className="font-semibold">{c.title}</span>
          ) : (
            <Link to={`/courses/${c.id}`} className="font-semibold text-accent-700 underline-offset-4 hover:underline">
              {c.title}
            </Link>
          )}
          {c.isDemo ? <DemoBadge /> : null}
        </span>
      );
    },
  }),
  col.accessor('institution', { header: 'Institution', cell: (i) => i.getValue() ?? '—' }),
  col.accessor('term', { header: 'Term', cell: (i) => i.getValue() ?? '—' }),
  col.accessor('role', { header: 'Your role', cell: (i) => ROLE_WORDS[i.getValue()] }),
  col.accessor('members', { header: 'Members', meta: { align: 'right' } }),
]);

export default function Courses({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageHeader title="Courses">
        {loaderData.canCreate ? (
          <Link
            to="/courses/new"
            className="inline-flex min-h-11 items-center rounded-lg bg-accent-700 px-4 font-semibold text-white hover:bg-accent-800"
          >
            New course
          </Link>
        ) : null}
      </PageHeader>
      {loaderData.courses.length === 0 ? (
        <p className="text-lg text-slate-700">
          {loaderData.canCreate
            ? 'You have no courses yet. Create one and you become its instructor; then invite assistants, researchers and participants.'
            : 'You have no courses yet. An instructor can invite you to one; to create courses yourself, ask a site administrator of Parley.'}
        </p>
      ) : (
        <DataTable
          columns={columns}
          data={loaderData.courses}
          caption="Your courses"
          filterLabel="Filter courses"
          initialSorting={[{ id: 'title', desc: false }]}
        />
      )}
    </>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Courses · Parley' }];
