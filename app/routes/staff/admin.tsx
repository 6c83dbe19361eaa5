import { count } from 'drizzle-orm';
import { Link } from 'react-router';
import type { Route } from './+types/admin';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { PageHeader } from '#app/components/shells';
import { DemoBadge } from '#app/components/ui';
import { listCoursesForUser } from '#app/models/course.server';
import { users } from '#drizzle/schema';
import { requireAdmin } from '#app/utils/auth.server';
import { db } from '#app/utils/db.server';

export async function loader({ request }: Route.LoaderArgs) {
  const admin = await requireAdmin(request);
  const [courses, [{ n }]] = await Promise.all([listCoursesForUser(admin.id, true), db().select({ n: count() }).from(users)]);
  return { courses: courses.map(({ id, title, institution, term, members, isDemo }) => ({ id, title, institution, term, members, isDemo })), users: n };
}

type Row = Route.ComponentProps['loaderData']['courses'][number];
const col = staffColumnHelper<Row>();
const columns = col.columns([
  col.accessor('title', {
    header: 'Course',
    cell: (i) => (
      <span className="flex items-center gap-2">
        <Link to={`/courses/${i.row.original.id}`} className="font-semibold text-accent-700 hover:underline">
          {i.getValue()}
        </Link>
        {i.row.original.isDemo ? <DemoBadge /> : null}
      </span>
    ),
  }),
  col.accessor('institution', { header: 'Institution', cell: (i) => i.getValue() ?? '—' }),
  col.accessor('term', { header: 'Term', cell: (i) => i.getValue() ?? '—' }),
  col.accessor('members', { header: 'Members', meta: { align: 'right' } }),
]);

export default function Admin({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageHeader title="Site admin" />
      <p className="mb-4 text-slate-700">
        <span className="num font-semibold">{loaderData.users}</span> accounts · <span className="num font-semibold">{loaderData.courses.length}</span> courses.
        Site admins act as instructors in every course.
      </p>
      <DataTable columns={columns} data={loaderData.courses} caption="All courses" filterLabel="Filter courses" />
    </>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Site admin · Parley' }];
