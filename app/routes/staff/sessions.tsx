import { data, Form, Link, redirect, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/sessions';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, Notice, SelectField, TextField } from '#app/components/ui';
import { listDesigns } from '#app/models/design.server';
import { createSessionFromDesign, listSessions } from '#app/models/session.server';
import { fieldErrors } from '#app/utils/forms';
import { formatDate } from '#app/utils/format';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { runner } from '#app/utils/runner.server';
import { SessionStatusWord } from '#app/components/session-status';

const MAX_SEED = 2 ** 32 - 1;
const SEED_HINT = `A seed is a whole number from 0 to ${MAX_SEED}, as shown under “Frozen design” on another session’s page. Leave it empty for new draws.`;

const OpenForm = z.object({
  designId: z.coerce.number({ error: 'Choose a design.' }).int().positive('Choose a design.'),
  // A seed is reused by typing another session's seed as the Conductor shows it (a whole number).
  // Any other text used to be hashed into a seed silently, so a typo gave other draws unnoticed.
  seed: z
    .string()
    .trim()
    .regex(/^\d{0,10}$/, SEED_HINT)
    .refine((s) => s === '' || Number(s) <= MAX_SEED, SEED_HINT)
    .transform((s) => s || null),
  admission: z.enum(['roster', 'open'], 'Choose who may join.'),
  emailDomain: z
    .string()
    .trim()
    .toLowerCase()
    .regex(/^$|^[a-z0-9.-]+\.[a-z]{2,}$/, 'A domain such as halvorsen.example, or empty.')
    .transform((s) => s || null),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const [sessions, designs] = await Promise.all([listSessions(course.id), listDesigns(course.id)]);
  return {
    course,
    canOpen: role === 'instructor',
    sessions,
    designs: designs
      .filter((d) => !d.archivedAt)
      .map((d) => ({ id: d.id, name: d.name, delta: d.params.delta, supergames: d.params.supergames })),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  const form = Object.fromEntries(await request.formData());
  const parsed = OpenForm.safeParse(form);
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error), values: form }, { status: 400 });
  const res = await createSessionFromDesign({ courseId: course.id, userId: user.id, ...parsed.data });
  if (!res.ok) return data({ errors: { [res.field]: res.message }, values: form }, { status: 400 });
  const opened = await runner().submit(res.sessionId, { type: 'open' }, { userId: user.id });
  if (opened.error) throw new Error(`opening failed: ${opened.error.message}`);
  throw redirect(`/courses/${course.id}/sessions/${res.sessionId}`);
}

type Row = Route.ComponentProps['loaderData']['sessions'][number];

export default function Sessions({ loaderData, actionData }: Route.ComponentProps) {
  const { course, canOpen, sessions, designs } = loaderData;
  const errors: Record<string, string | undefined> = actionData?.errors ?? {};
  const values = (actionData?.values ?? {}) as Record<string, string | undefined>;
  const busy = useNavigation().state === 'submitting';
  const col = staffColumnHelper<Row>();
  const columns = col.columns([
    col.accessor('treatment', {
      header: 'Session',
      cell: (i) => (
        <span className="flex flex-wrap items-center gap-2">
          <Link
            to={`/courses/${course.id}/sessions/${i.row.original.id}`}
            className="font-semibold text-accent-700 underline-offset-4 hover:underline"
          >
            #{i.row.original.id} {i.getValue()}
          </Link>
          {i.row.original.simulated ? (
            <span className="rounded-full border border-slate-300 px-2 text-xs font-semibold text-slate-700">simulated</span>
          ) : null}
        </span>
      ),
    }),
    col.accessor('status', {
      header: 'Status',
      cell: (i) => (
        <span>
          <SessionStatusWord status={i.getValue()} />
        </span>
      ),
    }),
    col.accessor('joinCode', {
      header: 'Join code',
      cell: (i) => (i.getValue() ? <span className="font-mono tracking-wider">{i.getValue()}</span> : '—'),
    }),
    col.accessor('participants', { header: 'Participants', meta: { align: 'right' } }),
    col.accessor('createdAt', { header: 'Made', cell: (i) => formatDate(i.getValue()), sortFn: 'datetime' }),
  ]);
  return (
    <>
      <PageHeader title="Sessions" eyebrow={<CourseCrumbs course={course} />} />
      {canOpen ? (
        <section aria-labelledby="open-title" className="mb-8 max-w-4xl rounded-lg border border-slate-200 bg-white p-4">
          <h2 id="open-title" className="mb-1 text-lg font-semibold">
            Open a session
          </h2>
          <p className="mb-3 text-sm text-slate-600">The design is frozen into the session: later edits to the design do not change it.</p>
          {designs.length === 0 ? (
            <p className="text-slate-700">
              First{' '}
              <Link to={`/courses/${course.id}/designs/new`} className="font-semibold text-accent-700 underline">
                make a design
              </Link>
              .
            </p>
          ) : (
            <Form method="post" className="grid gap-3 sm:grid-cols-2" noValidate>
              <SelectField
                label="Design"
                name="designId"
                defaultValue={values.designId}
                error={errors.designId}
                options={designs.map((d) => ({ value: String(d.id), label: `${d.name} (δ = ${d.delta}, ${d.supergames} supergames)` }))}
              />
              <SelectField
                label="Who may join"
                name="admission"
                defaultValue={values.admission ?? 'roster'}
                error={errors.admission}
                options={[
                  { value: 'roster', label: 'Members of this course only' },
                  { value: 'open', label: 'Anyone who signs in (optionally by e-mail domain)' },
                ]}
              />
              <TextField
                label="E-mail domain (open sessions, optional)"
                name="emailDomain"
                defaultValue={values.emailDomain}
                error={errors.emailDomain}
                placeholder="halvorsen.example"
              />
              <TextField
                label="Seed (optional)"
                name="seed"
                defaultValue={values.seed}
                error={errors.seed}
                inputMode="numeric"
                hint="Type another session’s seed (a whole number, under “Frozen design” on its page) to reuse its draws and matching, to hold supergame lengths fixed across treatments; empty draws a new one."
              />
              <div className="sm:col-span-2">
                <Button type="submit" disabled={busy}>
                  {busy ? 'Opening…' : 'Open session'}
                </Button>
              </div>
            </Form>
          )}
        </section>
      ) : null}
      {sessions.length ? (
        <DataTable columns={columns} data={sessions} caption="Sessions of this course" filterLabel="Filter sessions" />
      ) : (
        <Notice>No sessions yet.</Notice>
      )}
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Sessions · ${data?.course.title ?? 'Course'} · Parley` }];
