import { Link } from 'react-router';
import type { Route } from './+types/data';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, ButtonLink, Notice } from '#app/components/ui';
import { FORMULA_NOTE, PANEL_CODEBOOK, PANEL_NOTES } from '#app/lib/panel-codebook';
import { listExportableSessions, listExportLog } from '#app/models/exports.server';
import { formatDate } from '#app/utils/format';
import { requireCourseRole } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, ['instructor', 'researcher']);
  const isInstructor = role === 'instructor';
  const [sessions, log] = await Promise.all([
    listExportableSessions(course.id),
    isInstructor ? listExportLog(course.id) : Promise.resolve([]),
  ]);
  return { course, isInstructor, sessions, log };
}

type SessionRow = Route.ComponentProps['loaderData']['sessions'][number];

const FORM = 'panel-download';

function columnsFor(courseId: number, isInstructor: boolean) {
  const col = staffColumnHelper<SessionRow>();
  const base = `/courses/${courseId}/data/panel`;
  return col.columns([
    col.display({
      id: 'pick',
      header: () => <span className="sr-only">Choose</span>,
      cell: (i) => (
        <input
          type="checkbox"
          name="session"
          value={i.row.original.id}
          form={FORM}
          aria-label={`Choose session ${i.row.original.id}`}
          className="size-5 accent-accent-700"
        />
      ),
    }),
    col.accessor('id', { header: 'Session', meta: { align: 'right' }, sortFn: 'basic' }),
    col.accessor('treatment', {
      header: 'Treatment',
      cell: (i) => (
        <span>
          {i.getValue()}
          {i.row.original.simulated ? <span className="ml-2 text-xs text-slate-600">(simulated)</span> : null}
        </span>
      ),
    }),
    col.accessor('delta', { header: 'δ', meta: { align: 'right' }, sortFn: 'basic' }),
    col.accessor('participants', { header: 'Participants', meta: { align: 'right' }, sortFn: 'basic' }),
    col.accessor('declined', {
      header: 'Declined consent',
      meta: { align: 'right' },
      sortFn: 'basic',
      cell: (i) => <span title="left out of de-identified exports">{i.getValue()}</span>,
    }),
    col.accessor('rows', { header: 'Rows', meta: { align: 'right' }, sortFn: 'basic', cell: (i) => i.getValue().toLocaleString('en-GB') }),
    col.accessor('completedAt', { header: 'Completed', sortFn: 'datetime', cell: (i) => (i.getValue() ? formatDate(i.getValue()!) : '—') }),
    col.display({
      id: 'download',
      header: 'Download',
      cell: (i) => {
        const id = i.row.original.id;
        return (
          <span className="flex flex-wrap gap-2 whitespace-nowrap">
            <a
              className="font-semibold text-accent-700 underline-offset-4 hover:underline"
              href={`${base}?session=${id}&format=csv`}
              download
            >
              CSV<span className="sr-only"> panel of session {id}</span>
            </a>
            <a
              className="font-semibold text-accent-700 underline-offset-4 hover:underline"
              href={`${base}?session=${id}&format=json`}
              download
            >
              JSON<span className="sr-only"> panel of session {id}</span>
            </a>
            {isInstructor ? (
              <Link
                className="font-semibold text-accent-700 underline-offset-4 hover:underline"
                to={`/courses/${courseId}/sessions/${id}/results`}
              >
                Credit &amp; results<span className="sr-only"> of session {id}</span>
              </Link>
            ) : null}
          </span>
        );
      },
    }),
  ]);
}

export default function DataPage({ loaderData }: Route.ComponentProps) {
  const { course, isInstructor, sessions, log } = loaderData;
  const panelUrl = `/courses/${course.id}/data/panel`;
  return (
    <>
      <PageHeader title="Data" eyebrow={<CourseCrumbs course={course} />}>
        <ButtonLink to={`/courses/${course.id}/datasets`} variant="secondary">
          Uploaded panels
        </ButtonLink>
        <ButtonLink to="/settings/tokens" variant="secondary">
          API tokens
        </ButtonLink>
      </PageHeader>
      <div className="mb-6 flex max-w-3xl flex-col gap-3">
        <Notice title="Research use">
          Using classroom data for research needs your institution’s ethics-board approval and the participants’ informed consent. Downloads
          here are de-identified: pseudonyms only, no names, e-mail addresses, student ids or network addresses, and participants who
          declined research consent are left out.
        </Notice>
      </div>

      <section aria-labelledby="sessions" className="mb-8">
        <h2 id="sessions" className="mb-3 text-lg font-semibold">
          Completed sessions
        </h2>
        {sessions.length === 0 ? (
          <p className="text-slate-700">No session of this course is complete yet.</p>
        ) : (
          <>
            <DataTable
              columns={columnsFor(course.id, isInstructor)}
              data={sessions}
              caption="Completed sessions"
              filterLabel="Filter sessions"
              initialSorting={[{ id: 'id', desc: false }]}
            />
            <form
              id={FORM}
              method="get"
              action={panelUrl}
              className="mt-4 flex flex-wrap items-end gap-3 rounded-lg border border-slate-200 bg-white p-4"
            >
              <fieldset className="flex flex-wrap items-center gap-4">
                <legend className="mb-1 font-semibold text-slate-800">Chosen sessions as one download</legend>
                {(
                  [
                    ['zip', 'Zip: panel.csv, codebook.csv and a README'],
                    ['csv', 'One CSV'],
                    ['json', 'One JSON'],
                  ] as const
                ).map(([value, label]) => (
                  <label key={value} className="flex min-h-11 items-center gap-2">
                    <input type="radio" name="format" value={value} defaultChecked={value === 'zip'} className="size-5 accent-accent-700" />
                    {label}
                  </label>
                ))}
              </fieldset>
              <Button type="submit">Download chosen sessions</Button>
            </form>
          </>
        )}
      </section>

      {isInstructor && sessions.length > 0 ? (
        <section aria-labelledby="identified" className="mb-8 max-w-3xl rounded-lg border border-amber-300 bg-white p-4">
          <h2 id="identified" className="mb-2 flex items-center gap-2 text-lg font-semibold">
            <span aria-hidden="true">⚠</span> Identified export (instructors only)
          </h2>
          <p className="mb-3 text-slate-700">
            Adds each participant’s name, e-mail address, student id and consent answer, and keeps those who declined research consent. It
            carries personal data under your institution’s privacy rules: keep it apart from research files and delete it when no longer
            needed. Every identified download is logged with your name.
          </p>
          <form method="post" action={panelUrl} className="flex flex-col gap-3">
            <fieldset className="flex flex-wrap gap-4">
              <legend className="mb-1 font-semibold text-slate-800">Sessions</legend>
              {sessions.map((s) => (
                <label key={s.id} className="flex min-h-11 items-center gap-2">
                  <input type="checkbox" name="session" value={s.id} className="size-5 accent-accent-700" />
                  Session {s.id} · {s.treatment}
                </label>
              ))}
            </fieldset>
            <input type="hidden" name="format" value="csv" />
            <label className="flex items-start gap-2">
              <input type="checkbox" name="confirm" value="yes" required className="mt-1 size-5 accent-accent-700" />
              <span>I will handle this personal data under my institution’s privacy rules.</span>
            </label>
            <div>
              <Button type="submit" variant="secondary">
                Download identified CSV
              </Button>
            </div>
          </form>
          {log.length > 0 ? (
            <details className="mt-4">
              <summary className="cursor-pointer font-semibold text-slate-800">Export log ({log.length} most recent)</summary>
              <ul className="mt-2 flex flex-col gap-1 text-sm text-slate-700">
                {log.map((l) => (
                  <li key={l.id}>
                    {new Date(l.at).toISOString().replace('T', ' ').slice(0, 16)} UTC ·{' '}
                    {l.kind === 'credit-sheet' ? 'credit sheet' : 'identified panel'}
                    {l.sessionId ? ` · session ${l.sessionId}` : ''} · {l.email}
                  </li>
                ))}
              </ul>
            </details>
          ) : null}
        </section>
      ) : null}

      <section aria-labelledby="codebook" className="max-w-5xl">
        <div className="mb-3 flex flex-wrap items-center justify-between gap-2">
          <h2 id="codebook" className="text-lg font-semibold">
            Codebook
          </h2>
          <a
            className="font-semibold text-accent-700 underline-offset-4 hover:underline"
            href={`/courses/${course.id}/data/codebook.csv`}
            download
          >
            Download codebook (CSV)
          </a>
        </div>
        <p className="mb-3 text-slate-700">
          One row per participant × supergame × round. CSV with a header line, no index column, <code>.</code> as the decimal mark and ISO
          8601 timestamps (UTC): <code>read.csv()</code> in R and <code>pandas.read_csv()</code> read it as it is. {FORMULA_NOTE}
        </p>
        <ul className="mb-3 max-w-3xl list-disc pl-5 text-slate-700">
          {PANEL_NOTES.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
        {/* Scrolls sideways on a phone: focusable, so a keyboard can scroll it too. */}
        <div
          tabIndex={0}
          role="region"
          aria-label="Codebook of the choice panel"
          className="overflow-x-auto rounded-lg border border-slate-200 bg-white"
        >
          <table className="w-full text-left text-sm">
            <caption className="sr-only">Codebook of the choice panel</caption>
            <thead className="border-b border-slate-200 bg-slate-50">
              <tr>
                <th scope="col" className="px-3 py-2">
                  Column
                </th>
                <th scope="col" className="px-3 py-2">
                  Type
                </th>
                <th scope="col" className="px-3 py-2">
                  Meaning
                </th>
                <th scope="col" className="px-3 py-2">
                  Values
                </th>
              </tr>
            </thead>
            <tbody>
              {PANEL_CODEBOOK.map((c) => (
                <tr key={c.column} className="border-b border-slate-100 last:border-0">
                  <th scope="row" className="px-3 py-2 font-mono font-semibold">
                    {c.column}
                  </th>
                  <td className="px-3 py-2">{c.type}</td>
                  <td className="px-3 py-2">{c.meaning}</td>
                  <td className="px-3 py-2">{c.values}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Data · ${data?.course.title ?? 'Course'} · Parley` }];
