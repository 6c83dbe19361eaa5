import { useMemo } from 'react';
import { Form, Link } from 'react-router';
import type { Route } from './+types/choose';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button } from '#app/components/ui';
import { participantCounts } from '#app/models/debrief.server';
import { listCourseSessions } from '#app/models/panel.server';
import { formatDate } from '#app/utils/format';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { SessionStatusWord } from '#app/components/session-status';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const sessions = (await listCourseSessions(course.id)).filter((s) => s.status !== 'draft' && s.status !== 'open');
  const counts = await participantCounts(sessions.map((s) => s.id));
  return {
    course,
    sessions: sessions.map((s) => ({
      id: s.id,
      treatment: s.treatment,
      delta: s.design.delta,
      supergames: s.design.supergames,
      participants: counts.get(s.id) ?? 0,
      status: s.status,
      simulated: s.simulated,
      completedAt: s.completedAt,
    })),
  };
}

type Row = Route.ComponentProps['loaderData']['sessions'][number];

function columnsFor(courseId: number) {
  const col = staffColumnHelper<Row>();
  return col.columns([
    col.display({
      id: 'pick',
      header: () => <span className="sr-only">Compare</span>,
      cell: (i) => (
        <input
          type="checkbox"
          name="sessions"
          value={i.row.original.id}
          form="compare"
          aria-label={`Compare session #${i.row.original.id} ${i.row.original.treatment}`}
          className="size-5"
        />
      ),
    }),
    col.accessor('id', { header: 'Session', cell: (i) => `#${i.getValue()}`, meta: { align: 'right' } }),
    col.accessor('treatment', {
      header: 'Treatment (design)',
      cell: (i) => (
        <Link
          to={`/courses/${courseId}/debrief/${i.row.original.id}`}
          className="font-semibold text-accent-700 underline-offset-4 hover:underline"
        >
          {i.getValue()}
        </Link>
      ),
    }),
    col.accessor('delta', { header: 'δ', cell: (i) => String(Number(i.getValue().toFixed(4))), meta: { align: 'right' } }),
    col.accessor('supergames', { header: 'Supergames', meta: { align: 'right' } }),
    col.accessor('participants', { header: 'Participants', meta: { align: 'right' } }),
    col.accessor('status', {
      header: 'Status',
      cell: (i) => (
        <>
          <SessionStatusWord status={i.getValue()} />
        </>
      ),
    }),
    col.accessor((r) => (r.completedAt ? formatDate(r.completedAt) : '–'), { id: 'completed', header: 'Completed' }),
    col.accessor((r) => (r.simulated ? '◇ simulated (demo)' : 'live'), { id: 'kind', header: 'Choices' }),
  ]);
}

export default function DebriefIndex({ loaderData }: Route.ComponentProps) {
  const { course, sessions } = loaderData;
  // Stable columns: TanStack renders each cell function as a component, so new functions on a
  // re-render would remount the cells and drop the ticks already made.
  const columns = useMemo(() => columnsFor(course.id), [course.id]);
  return (
    <>
      <PageHeader title="Debrief" eyebrow={<CourseCrumbs course={course} />} />
      <p className="mb-4 max-w-3xl text-slate-700">
        Open a session’s Debrief, or tick several sessions (treatments) and compare them side by side. Everything here is de-identified:
        participants appear by their pseudonyms only.
      </p>
      {sessions.length === 0 ? (
        <p className="text-lg text-slate-700">No session has started yet. A session’s Debrief appears here once it runs.</p>
      ) : (
        <>
          <DataTable
            columns={columns}
            data={sessions}
            caption="Sessions of this course"
            filterLabel="Filter sessions"
            initialSorting={[{ id: 'id', desc: false }]}
          />
          <Form id="compare" method="get" action={`/courses/${course.id}/debrief/compare`} className="mt-4">
            <Button type="submit">Compare the ticked sessions</Button>
          </Form>
        </>
      )}
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Debrief · ${data?.course.title ?? 'Course'} · Parley` }];
