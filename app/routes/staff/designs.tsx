import { data, Link } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/designs';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Notice, RowAction } from '#app/components/ui';
import { duplicateDesign, listDesigns, setDesignArchived } from '#app/models/design.server';
import { formatDate } from '#app/utils/format';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

const DesignAction = z.object({
  intent: z.enum(['duplicate', 'archive', 'restore']),
  designId: z.coerce.number().int().positive(),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const designs = await listDesigns(course.id);
  return {
    course,
    canEdit: role === 'instructor',
    designs: designs.map((d) => ({
      id: d.id,
      name: d.name,
      version: d.version,
      sessionCount: d.sessionCount,
      payoffs: d.params.payoffs,
      delta: d.params.delta,
      supergames: d.params.supergames,
      roundSeconds: d.params.roundSeconds,
      updatedAt: d.updatedAt,
      status: d.archivedAt ? ('archived' as const) : ('active' as const),
    })),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  const parsed = DesignAction.safeParse(Object.fromEntries(await request.formData()));
  if (!parsed.success) return data({ ok: false, message: 'That request did not name a design and an action.' }, { status: 400 });
  const { intent, designId } = parsed.data;
  if (intent === 'duplicate') {
    const id = await duplicateDesign(course.id, designId, user.id);
    if (!id) return data({ ok: false, message: 'That design is not in this course.' }, { status: 404 });
    return { ok: true, message: 'Design duplicated: the copy is in the list.' };
  }
  if (!(await setDesignArchived(course.id, designId, intent === 'archive'))) {
    return data({ ok: false, message: 'That design is not in this course.' }, { status: 404 });
  }
  return { ok: true, message: intent === 'archive' ? 'Design archived.' : 'Design restored.' };
}

type Row = Route.ComponentProps['loaderData']['designs'][number];
const fmt = (x: number) => String(Number(x.toFixed(4)));

function columnsFor(courseId: number, canEdit: boolean) {
  const col = staffColumnHelper<Row>();
  return col.columns([
    col.accessor('name', {
      header: 'Design',
      cell: (i) => (
        <Link
          to={`/courses/${courseId}/designs/${i.row.original.id}`}
          className="font-semibold text-accent-700 underline-offset-4 hover:underline"
        >
          {i.getValue()}
          {i.row.original.version > 1 ? <span className="font-normal text-slate-600"> (v{i.row.original.version})</span> : null}
        </Link>
      ),
    }),
    col.accessor((r) => `${fmt(r.payoffs.T)} / ${fmt(r.payoffs.R)} / ${fmt(r.payoffs.P)} / ${fmt(r.payoffs.S)}`, {
      id: 'payoffs',
      header: 'T / R / P / S',
      meta: { align: 'right' },
    }),
    col.accessor('delta', { header: 'δ', cell: (i) => fmt(i.getValue()), meta: { align: 'right' } }),
    col.accessor('supergames', { header: 'Supergames', meta: { align: 'right' } }),
    col.accessor('roundSeconds', { header: 'Timer', cell: (i) => `${i.getValue()} s`, meta: { align: 'right' } }),
    col.accessor('sessionCount', {
      header: 'Sessions',
      cell: (i) =>
        i.getValue() > 0 ? (
          <span title="Used by a session: read-only; editing makes a new version">
            {i.getValue()} <span className="text-slate-600">· read-only</span>
          </span>
        ) : (
          '0'
        ),
      meta: { align: 'right' },
    }),
    col.accessor('updatedAt', { header: 'Changed', cell: (i) => formatDate(i.getValue()), sortFn: 'datetime' }),
    col.accessor('status', {
      header: 'Status',
      cell: (i) =>
        i.getValue() === 'archived' ? (
          <span className="text-slate-600">
            <span aria-hidden="true">▣ </span>Archived
          </span>
        ) : (
          <span>
            <span aria-hidden="true">● </span>Active
          </span>
        ),
    }),
    ...(canEdit
      ? [
          col.display({
            id: 'actions',
            header: () => <span className="sr-only">Actions</span>,
            cell: (i) => (
              <div className="flex gap-1">
                <RowAction
                  fields={{ intent: 'duplicate', designId: i.row.original.id }}
                  label="Duplicate"
                  target={i.row.original.name}
                  tone="quiet"
                />
                <RowAction
                  fields={{ intent: i.row.original.status === 'archived' ? 'restore' : 'archive', designId: i.row.original.id }}
                  label={i.row.original.status === 'archived' ? 'Restore' : 'Archive'}
                  target={i.row.original.name}
                  tone="quiet"
                />
              </div>
            ),
          }),
        ]
      : []),
  ]);
}

export default function Designs({ loaderData, actionData }: Route.ComponentProps) {
  const { course, canEdit, designs } = loaderData;
  return (
    <>
      <PageHeader title="Designs" eyebrow={<CourseCrumbs course={course} />}>
        {canEdit ? (
          <Link
            to={`/courses/${course.id}/designs/new`}
            className="inline-flex min-h-11 items-center rounded-lg bg-accent-700 px-4 font-semibold text-white hover:bg-accent-800"
          >
            New design
          </Link>
        ) : null}
      </PageHeader>
      <div className="mb-4" aria-live="polite">
        {actionData ? <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice> : null}
      </div>
      {designs.length === 0 ? (
        <p className="text-lg text-slate-700">
          No designs yet. A design fixes the payoffs, δ, the number of supergames and the rules of a session.
        </p>
      ) : (
        <DataTable
          columns={columnsFor(course.id, canEdit)}
          data={designs}
          caption="Designs of this course"
          filterLabel="Filter designs"
          initialSorting={[{ id: 'name', desc: false }]}
        />
      )}
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Designs · ${data?.course.title ?? 'Course'} · Parley` }];
