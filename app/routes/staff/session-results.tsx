import { useEffect, useId } from 'react';
import { useFetcher } from 'react-router';
import type { Route } from './+types/session-results';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, Notice, EmailAddress } from '#app/components/ui';
import { describeCreditRule, formatCredit } from '#app/lib/credit';
import { creditSheet } from '#app/models/exports.server';
import { findPanelSession } from '#app/models/panel-export.server';
import { resultMailStatus } from '#app/models/result-mails.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor']);
  const session = await findPanelSession(course.id, parseId(params.sessionId, 'session'));
  respondUnless(session, 404, 'No such session in this course.');
  const [lines, mails] = await Promise.all([creditSheet(session), resultMailStatus(session.id)]);
  return {
    course,
    session: {
      id: session.id,
      treatment: session.treatment,
      status: session.status,
      simulated: session.simulated,
      paid: session.credit.kind === 'paid',
    },
    rule: describeCreditRule(session.credit),
    credit: lines.map((l) => ({
      pseudonym: l.pseudonym,
      name: l.name,
      email: l.email,
      studentId: l.studentId,
      points: l.points,
      credit: formatCredit(l.credit),
    })),
    mails,
  };
}

type CreditRow = Route.ComponentProps['loaderData']['credit'][number];
type MailStatus = Route.ComponentProps['loaderData']['mails'];
type MailRow = MailStatus['rows'][number];

const creditCol = staffColumnHelper<CreditRow>();
const creditColumns = (paid: boolean) =>
  creditCol.columns([
    creditCol.accessor('pseudonym', { header: 'Pseudonym' }),
    creditCol.accessor('name', { header: 'Name', cell: (i) => i.getValue() || '—' }),
    creditCol.accessor('email', { header: 'E-mail', cell: (i) => <EmailAddress email={i.getValue()} /> }),
    creditCol.accessor('studentId', { header: 'Student id', cell: (i) => i.getValue() || '—' }),
    creditCol.accessor('points', { header: 'Points', meta: { align: 'right' }, sortFn: 'basic', cell: (i) => `${i.getValue()} pts` }),
    creditCol.accessor('credit', { header: paid ? 'Payout' : 'Credit', meta: { align: 'right' } }),
  ]);

/** A results e-mail's state (not a session's: app/utils/session-words.ts). */
const MAIL_STATUS_WORDS = {
  queued: ['◷', 'Waiting'],
  sending: ['➜', 'Sending'],
  sent: ['✓', 'Sent'],
  failed: ['✕', 'Failed'],
} as const;

const mailCol = staffColumnHelper<MailRow>();
const mailColumns = mailCol.columns([
  mailCol.accessor('pseudonym', { header: 'Pseudonym', cell: (i) => i.getValue() ?? '—' }),
  mailCol.accessor('email', { header: 'E-mail', cell: (i) => <EmailAddress email={i.getValue()} /> }),
  mailCol.accessor('status', {
    header: 'Status',
    cell: (i) => {
      const [icon, word] = MAIL_STATUS_WORDS[i.getValue()];
      return (
        <span className="inline-flex items-center gap-1 font-semibold">
          <span aria-hidden="true">{icon}</span> {word}
        </span>
      );
    },
  }),
  mailCol.accessor('attempts', { header: 'Attempts', meta: { align: 'right' }, sortFn: 'basic' }),
  mailCol.accessor('error', { header: 'Problem', cell: (i) => i.getValue() ?? '' }),
]);

function MailProgress({ status }: { status: MailStatus }) {
  const id = useId();
  const total = status.rows.length;
  const done = status.counts.sent + status.counts.failed;
  return (
    <div className="flex flex-col gap-2">
      <p id={id} className="font-semibold text-slate-800">
        {status.counts.sent} of {total} sent · {status.counts.failed} failed · {status.counts.queued + status.counts.sending} waiting
      </p>
      <div
        role="progressbar"
        aria-labelledby={id}
        aria-valuemin={0}
        aria-valuemax={total}
        aria-valuenow={done}
        className="h-3 w-full max-w-xl overflow-hidden rounded-full bg-slate-200"
      >
        <div className="h-full bg-accent-700 transition-[width]" style={{ width: `${total ? (100 * done) / total : 0}%` }} />
      </div>
    </div>
  );
}

export default function SessionResults({ loaderData }: Route.ComponentProps) {
  const { course, session, rule, credit } = loaderData;
  const poll = useFetcher<typeof import('#app/routes/data/result-mails').loader>();
  const act = useFetcher<typeof import('#app/routes/data/result-mails').action>();
  const mailsUrl = `/courses/${course.id}/sessions/${session.id}/result-mails`;
  const mails = poll.data ?? loaderData.mails;
  const busy = mails.busy || act.state !== 'idle';

  // While mails are on their way, refresh the status every second (no navigation).
  useEffect(() => {
    if (!busy) return;
    const timer = setInterval(() => {
      if (poll.state === 'idle') poll.load(mailsUrl);
    }, 1000);
    return () => clearInterval(timer);
  }, [busy, mailsUrl, poll]);
  // After an action, look at once.
  useEffect(() => {
    if (act.state === 'idle' && act.data) poll.load(mailsUrl);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [act.state, act.data]);

  const complete = session.status === 'complete' || session.status === 'archived';
  return (
    <>
      <PageHeader
        title={`Session ${session.id}: credit and results`}
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/data`, label: 'Data' }]} />}
      />
      <p className="mb-6 text-slate-700">
        {session.treatment}
        {session.simulated ? ' · simulated demo session: the choices are invented' : ''}
      </p>

      <section aria-labelledby="mails" className="mb-10">
        <h2 id="mails" className="mb-3 text-lg font-semibold">
          Results e-mails
        </h2>
        <p className="mb-3 max-w-3xl text-slate-700">
          Each participant gets their supergames, points and credit. Mails go out in the background a few per second; this page follows
          them.
        </p>
        <div className="mb-4 flex flex-col gap-3" aria-live="polite">
          {act.data ? <Notice tone={act.data.ok ? 'ok' : 'error'}>{act.data.message}</Notice> : null}
        </div>
        {!complete ? (
          <Notice tone="warn">Results can be e-mailed once the session is complete.</Notice>
        ) : (
          <div className="flex flex-col gap-4">
            <div className="flex flex-wrap gap-3">
              <act.Form method="post" action={mailsUrl}>
                <input type="hidden" name="intent" value="send" />
                <Button type="submit" disabled={act.state !== 'idle'}>
                  {mails.rows.length ? 'E-mail results to everyone not yet mailed' : `E-mail results to all ${credit.length} participants`}
                </Button>
              </act.Form>
              {mails.counts.failed > 0 ? (
                <act.Form method="post" action={mailsUrl}>
                  <input type="hidden" name="intent" value="retry" />
                  <Button type="submit" variant="secondary" disabled={act.state !== 'idle'}>
                    Retry {mails.counts.failed} failed
                  </Button>
                </act.Form>
              ) : null}
            </div>
            {mails.rows.length > 0 ? (
              <>
                <MailProgress status={mails} />
                <DataTable columns={mailColumns} data={mails.rows} caption="Results e-mails" filterLabel="Filter recipients" />
              </>
            ) : null}
          </div>
        )}
      </section>
      <section aria-labelledby="credit">
        <div className="mb-3 flex flex-wrap items-center justify-between gap-3">
          <h2 id="credit" className="text-lg font-semibold">
            Credit sheet
          </h2>
          <a
            href={`/courses/${course.id}/sessions/${session.id}/credit.csv`}
            download
            className="inline-flex min-h-11 items-center rounded-lg bg-accent-700 px-4 py-2 font-semibold text-white hover:bg-accent-800"
          >
            Download credit sheet (CSV)
          </a>
        </div>
        <p className="mb-3 max-w-3xl text-slate-700">
          Rule of this session’s design: {rule}. Points count the rounds of each supergame up to its length. Research consent plays no part
          in credit. The download carries names, e-mail addresses and student ids (personal data) and is logged.
          {session.paid ? ' Paid sessions follow your institution’s payment rules.' : ''}
        </p>
        <DataTable
          columns={creditColumns(session.paid)}
          data={credit}
          caption="Credit sheet"
          filterLabel="Filter participants"
          initialSorting={[{ id: 'pseudonym', desc: false }]}
        />
      </section>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Session ${data?.session.id ?? ''} results · Parley` }];
