import { data, Form, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/roster';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { CsvFileField, LineIssues } from '#app/components/upload';
import { Button, Notice, EmailAddress } from '#app/components/ui';
import { parseRoster, ROSTER_LIMITS, type RosterIssue } from '#app/lib/roster-csv';
import { releaseCourseMail, reserveCourseMails } from '#app/models/course.server';
import { importRoster, type PlannedRow, planRoster, rosterMail } from '#app/models/roster.server';
import { env } from '#app/utils/env.server';
import { sendMail } from '#app/utils/mail.server';
import { requireCourseRole } from '#app/utils/permissions.server';

const Import = z.object({
  intent: z.literal('import'),
  csv: z.string().min(1, 'Choose the file again: the preview was lost.').max(ROSTER_LIMITS.maxBytes, 'The roster is too large.'),
  fileName: z.string().max(255).default('roster.csv'),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor']);
  return { course, limits: ROSTER_LIMITS };
}

interface Outcome {
  intent: 'preview' | 'import';
  fileName: string;
  csv: string;
  rows: PlannedRow[];
  errors: RosterIssue[];
  imported: { added: number; changed: number; unchanged: number; mailFailures: number; notMailed: number; mailCap: number } | null;
}

const sizeMessage = `The file is larger than ${ROSTER_LIMITS.maxBytes / 1024} KB: a roster of ${ROSTER_LIMITS.maxRows} people fits well below that. Export only the e-mail, name and student id columns.`;

function refuse(message: string, status = 400, fileName = '') {
  return data({ intent: 'preview', fileName, csv: '', rows: [], errors: [{ line: null, message }], imported: null } satisfies Outcome, {
    status,
  });
}

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  // Refuse an oversized upload before reading it.
  if (Number(request.headers.get('content-length') ?? 0) > ROSTER_LIMITS.maxBytes * 2 + 64 * 1024) return refuse(sizeMessage, 413);
  const form = await request.formData();
  let csv: string;
  let fileName: string;
  const intent = form.get('intent');
  if (intent === 'import') {
    const parsed = Import.safeParse(Object.fromEntries(form));
    if (!parsed.success) return refuse(parsed.error.issues[0].message);
    ({ csv, fileName } = parsed.data);
  } else if (intent === 'preview') {
    const file = form.get('file');
    if (!(file instanceof File) || file.size === 0) return refuse('Choose a CSV file with the columns e-mail, name and student id.');
    if (file.size > ROSTER_LIMITS.maxBytes) return refuse(sizeMessage, 413, file.name);
    fileName = file.name;
    csv = await file.text();
  } else {
    return refuse('Unknown action.');
  }

  const parsed = parseRoster(csv);
  const plan = await planRoster(course.id, parsed.rows);
  const errors = [...parsed.errors, ...plan.errors].sort((a, b) => (a.line ?? 0) - (b.line ?? 0));
  const outcome: Outcome = { intent: intent === 'import' ? 'import' : 'preview', fileName, csv, rows: plan.rows, errors, imported: null };
  if (errors.length || intent === 'preview') return data(outcome, { status: errors.length ? 400 : 200 });

  const res = await importRoster(course.id, parsed.rows);
  if (!res.ok) return data({ ...outcome, errors: res.errors }, { status: 400 });
  // The roster is written whatever the course's daily mail cap; past the cap nobody is mailed
  // (the mail only tells people they are on the roster) and the instructor is told how many.
  const { added } = res.result;
  const reservations = await reserveCourseMails(
    course.id,
    user.id,
    'roster',
    added.map((r) => r.email),
  );
  let mailFailures = 0;
  for (const [i, id] of reservations.entries()) {
    const r = added[i];
    try {
      await sendMail(rosterMail({ to: r.email, name: r.name, courseTitle: course.title, instructor: user }));
    } catch {
      mailFailures += 1;
      await releaseCourseMail(id);
    }
  }
  const imported = {
    added: added.length,
    changed: res.result.changed,
    unchanged: res.result.unchanged,
    mailFailures,
    notMailed: added.length - reservations.length,
    mailCap: env().INVITES_PER_COURSE_PER_DAY,
  };
  return { ...outcome, csv: '', imported } satisfies Outcome;
}

const STATUS = {
  new: ['+', 'New participant'],
  unchanged: ['✓', 'Already on the roster'],
  'student-id-changes': ['±', 'Student id changes'],
} as const;

const col = staffColumnHelper<PlannedRow>();
const columns = col.columns([
  col.accessor('line', { header: 'Line', meta: { align: 'right' }, sortFn: 'basic' }),
  col.accessor('email', { header: 'E-mail', cell: (i) => <EmailAddress email={i.getValue()} /> }),
  col.accessor('name', {
    header: 'Name',
    cell: (i) => (
      <span>
        {i.getValue()}
        {i.row.original.knownName ? <span className="block text-xs text-slate-600">Parley keeps “{i.row.original.knownName}”</span> : null}
      </span>
    ),
  }),
  col.accessor('studentId', { header: 'Student id' }),
  col.accessor('status', {
    header: 'What happens',
    cell: (i) => {
      const [icon, words] = STATUS[i.getValue()];
      return (
        <span className="inline-flex items-center gap-1 whitespace-nowrap">
          <span aria-hidden="true">{icon}</span> {words}
        </span>
      );
    },
  }),
]);

export default function Roster({ loaderData, actionData }: Route.ComponentProps) {
  const { course, limits } = loaderData;
  const nav = useNavigation();
  const busy = nav.state === 'submitting';
  const outcome = actionData;
  const counts = { new: 0, unchanged: 0, 'student-id-changes': 0 };
  for (const r of outcome?.rows ?? []) counts[r.status] += 1;
  const canImport = outcome && outcome.intent === 'preview' && outcome.errors.length === 0 && outcome.rows.length > 0;
  return (
    <>
      <PageHeader
        title="Roster upload"
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/members`, label: 'Members' }]} />}
      />
      <section aria-labelledby="upload" className="mb-6 max-w-3xl rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="upload" className="mb-2 text-lg font-semibold">
          1. Choose the class list
        </h2>
        <p className="mb-3 text-slate-700">
          A CSV file with a header line and the columns <strong>e-mail</strong>, <strong>name</strong> and <strong>student id</strong>, in
          any order (“Email address”, “Full name”, “Student number” and similar names are recognised; so are “First name” and “Last name”).
          Comma or semicolon, UTF-8. At most {limits.maxRows.toLocaleString('en-GB')} people and {limits.maxBytes / 1024} KB. Nothing is
          written until you import.
        </p>
        <Form method="post" encType="multipart/form-data" className="flex flex-wrap items-end gap-3">
          <input type="hidden" name="intent" value="preview" />
          <CsvFileField label="Roster file (CSV)" />
          <Button type="submit" disabled={busy}>
            Check the file
          </Button>
        </Form>
      </section>

      <div aria-live="polite" className="flex max-w-3xl flex-col gap-3">
        {outcome?.imported ? (
          <Notice tone="ok" title="Roster imported">
            {outcome.imported.added} new participant{outcome.imported.added === 1 ? '' : 's'} added
            {outcome.imported.notMailed ? '' : ' and e-mailed'}, {outcome.imported.changed} student id
            {outcome.imported.changed === 1 ? '' : 's'} changed, {outcome.imported.unchanged} already on the roster.
            {outcome.imported.mailFailures
              ? ` ${outcome.imported.mailFailures} e-mail(s) could not be sent; the people are on the roster all the same.`
              : ''}
          </Notice>
        ) : null}
        {outcome?.imported?.notMailed ? (
          <Notice tone="warn" title="Not everyone was e-mailed">
            {outcome.imported.notMailed === 1 ? '1 person was' : `${outcome.imported.notMailed} people were`} not e-mailed: this course has
            sent its {outcome.imported.mailCap} e-mails for today (invitations and roster e-mails together). They are on the roster all the
            same and can sign in with their e-mail address.
          </Notice>
        ) : null}
        {outcome && outcome.errors.length > 0 ? (
          <LineIssues issues={outcome.errors.slice(0, 200)} total={outcome.errors.length} fileName={outcome.fileName} verb="written">
            <p className="mb-2">Fix these lines in the file and choose it again.</p>
          </LineIssues>
        ) : null}
      </div>

      {outcome && outcome.rows.length > 0 && !outcome.imported ? (
        <section aria-labelledby="preview" className="mt-6">
          <h2 id="preview" className="mb-2 text-lg font-semibold">
            2. Preview of {outcome.fileName}
          </h2>
          <p className="mb-3 text-slate-700">
            {outcome.rows.length} valid line{outcome.rows.length === 1 ? '' : 's'}: {counts.new} new, {counts['student-id-changes']} student
            id change
            {counts['student-id-changes'] === 1 ? '' : 's'}, {counts.unchanged} already on the roster.
          </p>
          <DataTable
            columns={columns}
            data={outcome.rows}
            caption="Roster preview"
            filterLabel="Filter the preview"
            initialSorting={[{ id: 'line', desc: false }]}
          />
          {canImport && counts.new + counts['student-id-changes'] === 0 ? (
            <div className="mt-4">
              <Notice tone="info">
                Everyone in this file is already on the roster with the same student id: there is nothing to import.
              </Notice>
            </div>
          ) : canImport ? (
            <Form method="post" className="mt-4 flex flex-wrap items-center gap-3">
              <input type="hidden" name="intent" value="import" />
              <input type="hidden" name="fileName" value={outcome.fileName} />
              <input type="hidden" name="csv" value={outcome.csv} />
              <Button type="submit" disabled={busy}>
                Import {outcome.rows.length} {outcome.rows.length === 1 ? 'person' : 'people'}
              </Button>
              <p className="text-sm text-slate-600">
                New participants get an e-mail saying they are on the roster. All lines are written, or none.
              </p>
            </Form>
          ) : null}
        </section>
      ) : null}
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Roster upload · ${data?.course.title ?? 'Course'} · Parley` }];
