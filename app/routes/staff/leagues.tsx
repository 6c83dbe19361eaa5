// The course's strategy leagues: the list, with a link to start a new one (instructors).
import { Link } from 'react-router';
import type { Route } from './+types/leagues';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { LeagueStateBadge } from '#app/components/league-words';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { ButtonLink } from '#app/components/ui';
import { listLeagues } from '#app/models/league.server';
import { formatDate } from '#app/utils/format';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const leagues = await listLeagues(course.id);
  return {
    course,
    canEdit: role === 'instructor',
    leagues: leagues.map((l) => ({
      id: l.id,
      title: l.title,
      state: l.state,
      entries: l.entries,
      houseEntries: l.houseEntries,
      delta: l.design.delta,
      epsilon: l.design.epsilon,
      deadline: l.deadline,
      createdAt: l.createdAt,
    })),
  };
}

type Row = Route.ComponentProps['loaderData']['leagues'][number];

function columnsFor(courseId: number) {
  const col = staffColumnHelper<Row>();
  return col.columns([
    col.accessor('title', {
      header: 'League',
      cell: (i) => (
        <Link
          to={`/courses/${courseId}/leagues/${i.row.original.id}`}
          className="font-semibold text-accent-700 underline-offset-4 hover:underline"
        >
          {i.getValue()}
        </Link>
      ),
    }),
    col.accessor('state', { header: 'State', cell: (i) => <LeagueStateBadge state={i.getValue()} /> }),
    col.accessor('entries', {
      header: 'Entries',
      cell: (i) => (
        <span>
          {i.getValue()}
          {i.row.original.houseEntries > 0 ? <span className="text-slate-600"> ({i.row.original.houseEntries} house)</span> : null}
        </span>
      ),
      meta: { align: 'right' },
    }),
    col.accessor('delta', { header: 'δ', meta: { align: 'right' } }),
    col.accessor('epsilon', { header: 'ε', meta: { align: 'right' } }),
    col.accessor((r) => (r.deadline ? new Date(r.deadline).getTime() : 0), {
      id: 'deadline',
      header: 'Deadline',
      cell: (i) => (i.row.original.deadline ? formatDate(i.row.original.deadline) : <span className="text-slate-600">until closed</span>),
    }),
    col.accessor('createdAt', { header: 'Created', cell: (i) => formatDate(i.getValue()), sortFn: 'datetime' }),
  ]);
}

export default function Leagues({ loaderData }: Route.ComponentProps) {
  const { course, canEdit, leagues } = loaderData;
  return (
    <>
      <PageHeader title="Strategy leagues" eyebrow={<CourseCrumbs course={course} />}>
        {canEdit ? <ButtonLink to={`/courses/${course.id}/leagues/new`}>New league</ButtonLink> : null}
      </PageHeader>
      <p className="mb-6 max-w-3xl text-slate-700">
        In a strategy league each participant writes a strategy for the repeated prisoner’s dilemma as a small automaton; every entry then
        meets every other entry, and itself, as in Axelrod’s computer tournaments (Axelrod 1984). Parley computes each pair’s expected
        payoff exactly, ranks the entries, and lets them evolve by replicator dynamics.
      </p>
      {leagues.length === 0 ? (
        <p className="text-lg text-slate-700">No leagues yet.{canEdit ? ' Start one with “New league”.' : ''}</p>
      ) : (
        <DataTable
          columns={columnsFor(course.id)}
          data={leagues}
          caption="Strategy leagues of this course"
          filterLabel="Filter leagues"
          initialSorting={[{ id: 'createdAt', desc: true }]}
        />
      )}
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Strategy leagues · ${data?.course.title ?? 'Course'} · Parley` }];
