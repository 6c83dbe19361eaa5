import { data, Form, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/tokens';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { PageHeader } from '#app/components/shells';
import { Button, FieldError, Notice, RowAction, TextField } from '#app/components/ui';
import { createApiToken, listApiTokens, revokeApiToken, tokenCourseChoices } from '#app/models/api-tokens.server';
import { requireUser } from '#app/utils/auth.server';
import { env } from '#app/utils/env.server';
import { fieldErrors } from '#app/utils/forms';
import { formatDate } from '#app/utils/format';

const Create = z.object({
  intent: z.literal('create'),
  name: z
    .string()
    .trim()
    .min(1, 'Name the token after where it is used, e.g. “lab laptop, R scripts”.')
    .max(120, 'Keep the name to 120 characters.'),
  courseId: z.array(z.coerce.number().int().positive()).min(1, 'Choose at least one course the token may read.'),
});
const Revoke = z.object({ intent: z.literal('revoke'), id: z.coerce.number().int().positive() });

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const [courses, tokens] = await Promise.all([tokenCourseChoices(user.id, user.isAdmin), listApiTokens(user.id)]);
  return { courses, tokens, apiBase: new URL('/api/v1', env().APP_URL).toString() };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  if (form.get('intent') === 'revoke') {
    const parsed = Revoke.safeParse(Object.fromEntries(form));
    if (!parsed.success || !(await revokeApiToken(user.id, parsed.data.id))) {
      return data(
        { ok: false as const, errors: { form: 'That token is not yours or is already revoked.' }, token: null, message: null },
        { status: 404 },
      );
    }
    return { ok: true as const, errors: {}, token: null, message: 'Token revoked: it no longer opens the API.' };
  }
  const parsed = Create.safeParse({ intent: form.get('intent'), name: form.get('name'), courseId: form.getAll('courseId') });
  if (!parsed.success) return data({ ok: false as const, errors: fieldErrors(parsed.error), token: null, message: null }, { status: 400 });
  const allowed = new Set((await tokenCourseChoices(user.id, user.isAdmin)).map((c) => c.id));
  if (!parsed.data.courseId.every((id) => allowed.has(id))) {
    return data(
      {
        ok: false as const,
        errors: { courseId: 'You can scope a token only to courses where you are instructor or researcher.' },
        token: null,
        message: null,
      },
      { status: 403 },
    );
  }
  const token = await createApiToken(user.id, parsed.data.name, parsed.data.courseId);
  return { ok: true as const, errors: {}, token, message: `Token “${parsed.data.name}” created.` };
}

type TokenRow = Route.ComponentProps['loaderData']['tokens'][number];

function columnsFor(titles: Map<number, string>) {
  const col = staffColumnHelper<TokenRow>();
  return col.columns([
    col.accessor('name', { header: 'Name' }),
    col.accessor('prefix', { header: 'Starts with', cell: (i) => <code>{i.getValue()}…</code> }),
    col.accessor('courseIds', {
      header: 'Courses',
      enableSorting: false,
      cell: (i) =>
        i
          .getValue()
          .map((id) => titles.get(id) ?? `course ${id}`)
          .join(', '),
    }),
    col.accessor('createdAt', { header: 'Created', sortFn: 'datetime', cell: (i) => formatDate(i.getValue()) }),
    col.accessor('lastUsedAt', {
      header: 'Last used',
      sortFn: 'datetime',
      cell: (i) => (i.getValue() ? formatDate(i.getValue()!) : 'never'),
    }),
    col.display({
      id: 'status',
      header: 'Status',
      cell: (i) =>
        i.row.original.revokedAt ? (
          <span className="inline-flex items-center gap-1">
            <span aria-hidden="true">✕</span> Revoked
          </span>
        ) : (
          <span className="flex items-center gap-2">
            <span className="inline-flex items-center gap-1">
              <span aria-hidden="true">✓</span> Active
            </span>
            <RowAction
              fields={{ intent: 'revoke', id: i.row.original.id }}
              label="Revoke"
              target={i.row.original.name}
              confirmText={`Revoke “${i.row.original.name}”? Scripts using it stop working.`}
            />
          </span>
        ),
    }),
  ]);
}

export default function Tokens({ loaderData, actionData }: Route.ComponentProps) {
  const { courses, tokens, apiBase } = loaderData;
  const nav = useNavigation();
  const errors: Record<string, string | undefined> = actionData && !actionData.ok ? actionData.errors : {};
  const titles = new Map(courses.map((c) => [c.id, c.title]));
  const example = actionData?.token ?? 'prl_…';
  const firstCourse = courses[0]?.id ?? 1;
  return (
    <>
      <PageHeader title="API tokens" eyebrow="Settings" />
      <div className="mb-6 flex max-w-3xl flex-col gap-3" aria-live="polite">
        {actionData?.token ? (
          <Notice tone="ok" title={actionData.message ?? 'Token created'}>
            <p className="mb-2">Copy it now: Parley keeps only a fingerprint and cannot show it again.</p>
            <label htmlFor="new-token" className="font-semibold">
              Your new token
            </label>
            <input
              id="new-token"
              readOnly
              value={actionData.token}
              className="mt-1 block w-full rounded border border-slate-300 bg-white px-2 py-2 font-mono text-sm"
              onFocus={(e) => e.currentTarget.select()}
            />
          </Notice>
        ) : actionData?.ok ? (
          <Notice tone="ok">{actionData.message}</Notice>
        ) : null}
        {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
      </div>
      <p className="mb-4 max-w-3xl text-slate-700">
        Tokens let your scripts read the de-identified choice panels, sessions and estimates of the courses you choose, through the API at{' '}
        <code>{apiBase}</code>. Treat a token like a password; revoke it when a laptop or a script is retired. Research use needs your
        institution’s ethics-board approval and the participants’ consent.
      </p>
      {courses.length === 0 ? (
        <Notice tone="info">API tokens are for instructors and researchers of a course; you are neither in any course yet.</Notice>
      ) : (
        <section aria-labelledby="new" className="mb-8 max-w-3xl rounded-lg border border-slate-200 bg-white p-4">
          <h2 id="new" className="mb-3 text-lg font-semibold">
            New token
          </h2>
          <Form method="post" className="flex flex-col gap-4" noValidate>
            <input type="hidden" name="intent" value="create" />
            <TextField label="Name" name="name" error={errors.name} autoComplete="off" />
            <fieldset aria-describedby={errors.courseId ? 'course-error' : undefined}>
              <legend className="mb-1 font-semibold text-slate-800">Courses it may read</legend>
              <div className="flex flex-col gap-1">
                {courses.map((c) => (
                  <label key={c.id} className="flex min-h-11 items-center gap-2">
                    <input type="checkbox" name="courseId" value={c.id} className="size-5 accent-accent-700" />
                    {c.title}
                  </label>
                ))}
              </div>
              {errors.courseId ? <FieldError id="course-error">{errors.courseId}</FieldError> : null}
            </fieldset>
            <div>
              <Button type="submit" disabled={nav.state === 'submitting'}>
                Create token
              </Button>
            </div>
          </Form>
        </section>
      )}
      <section aria-labelledby="list" className="mb-8">
        <h2 id="list" className="mb-3 text-lg font-semibold">
          Your tokens
        </h2>
        <DataTable columns={columnsFor(titles)} data={tokens} caption="Your API tokens" filterLabel="Filter tokens" empty="No token yet." />
      </section>
      <section aria-labelledby="try" className="max-w-3xl">
        <h2 id="try" className="mb-2 text-lg font-semibold">
          Try it
        </h2>
        {/* Long lines scroll sideways: focusable, so a keyboard can scroll them too. */}
        <pre
          tabIndex={0}
          role="region"
          aria-label="Example requests"
          className="overflow-x-auto rounded-lg bg-slate-900 p-4 text-sm text-slate-100"
        >
          {[
            `curl -H "Authorization: Bearer ${example}" ${apiBase}/courses`,
            `curl -H "Authorization: Bearer ${example}" ${apiBase}/courses/${firstCourse}/sessions`,
            `curl -H "Authorization: Bearer ${example}" "${apiBase}/sessions/<session id>/panel?limit=1000"`,
            `curl -H "Authorization: Bearer ${example}" "${apiBase}/sessions/<session id>/panel?format=csv" -o panel.csv`,
          ].join('\n')}
        </pre>
        <p className="mt-2 text-sm text-slate-600">
          Every endpoint, its pagination and its errors are described in the API section of Parley’s README.
        </p>
      </section>
    </>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'API tokens · Parley' }];
