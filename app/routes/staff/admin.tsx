import { data, Form, Link } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/admin';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { PageHeader } from '#app/components/shells';
import { Button, DemoBadge, Notice, RowAction, TextField, EmailAddress } from '#app/components/ui';
import { countUsers, grantCourseCreation, listCourseCreators, listCoursesForUser, revokeCourseCreation } from '#app/models/course.server';
import { requireAdmin } from '#app/utils/auth.server';
import { env } from '#app/utils/env.server';
import { fieldErrors } from '#app/utils/forms';

export async function loader({ request }: Route.LoaderArgs) {
  const admin = await requireAdmin(request);
  const [courses, n, creators] = await Promise.all([listCoursesForUser(admin.id, true), countUsers(), listCourseCreators()]);
  return {
    courses: courses.map(({ id, title, institution, term, members, isDemo }) => ({ id, title, institution, term, members, isDemo })),
    users: n,
    creators,
    instructorDomains: env().INSTRUCTOR_DOMAINS,
  };
}

// Who may create courses: docs/decisions/023-who-creates-courses.md.
const AdminAction = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('grant'), email: z.email('Enter an e-mail address such as name@university.edu.').max(254) }),
  z.object({ intent: z.literal('revoke'), userId: z.coerce.number().int().positive() }),
]);

export async function action({ request }: Route.ActionArgs) {
  await requireAdmin(request);
  const form = Object.fromEntries(await request.formData());
  const parsed = AdminAction.safeParse(form);
  if (!parsed.success) return data({ ok: false as const, errors: fieldErrors(parsed.error), values: form, message: null }, { status: 400 });
  const a = parsed.data;
  if (a.intent === 'grant') {
    await grantCourseCreation(a.email);
    return { ok: true as const, message: `${a.email.toLowerCase()} may now create courses.` };
  }
  if (!(await revokeCourseCreation(a.userId)))
    return data({ ok: false as const, errors: {}, values: form, message: 'No such account.' }, { status: 404 });
  return { ok: true as const, message: 'The account may no longer create courses. Its courses stay as they are.' };
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

export default function Admin({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData && !actionData.ok ? actionData.errors : {};
  const values = (actionData && !actionData.ok ? actionData.values : {}) as Record<string, string | undefined>;
  const { creators, instructorDomains } = loaderData;
  return (
    <>
      <PageHeader title="Site admin" />
      <p className="mb-4 text-slate-700">
        <span className="num font-semibold">{loaderData.users}</span> accounts ·{' '}
        <span className="num font-semibold">{loaderData.courses.length}</span> courses. Site admins act as instructors in every course.
      </p>
      <DataTable columns={columns} data={loaderData.courses} caption="All courses" filterLabel="Filter courses" />

      <section aria-labelledby="creators" className="mt-8 max-w-3xl rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="creators" className="mb-2 text-lg font-semibold">
          Who may create courses
        </h2>
        <p className="mb-3 text-slate-700">
          Site admins, the accounts below
          {instructorDomains.length ? (
            <>, and every address at {instructorDomains.join(', ')} (exactly that domain, not its subdomains)</>
          ) : null}
          . Everyone else can only be invited to courses. Taking the right away leaves the courses an account already runs as they are.
        </p>
        <div aria-live="polite" className="mb-3">
          {actionData?.ok ? <Notice tone="ok">{actionData.message}</Notice> : null}
          {actionData && !actionData.ok && actionData.message ? <Notice tone="error">{actionData.message}</Notice> : null}
        </div>
        <Form method="post" className="mb-4 flex flex-wrap items-start gap-3" noValidate>
          <input type="hidden" name="intent" value="grant" />
          <TextField
            label="E-mail address"
            name="email"
            type="email"
            autoComplete="off"
            className="min-w-72 flex-1"
            defaultValue={values.email}
            error={errors.email}
          />
          <Button type="submit" className="mt-7">
            Allow to create courses
          </Button>
        </Form>
        {creators.length ? (
          <ul className="flex flex-col divide-y divide-slate-100 rounded-lg border border-slate-200">
            {creators.map((c) => (
              <li key={c.id} className="flex flex-wrap items-center justify-between gap-2 px-4 py-2">
                <span>
                  <EmailAddress email={c.email} />
                  {c.name ? <span className="text-slate-600"> · {c.name}</span> : null}
                </span>
                <RowAction
                  fields={{ intent: 'revoke', userId: c.id }}
                  label="Take away"
                  target={`the right to create courses from ${c.email}`}
                />
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-slate-600">No account has been allowed yet.</p>
        )}
      </section>
    </>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Site admin · Parley' }];
