import { useEffect, useRef, useState } from 'react';
import { Link } from 'react-router';
import type { Route } from './+types/conductor';
import { MATCHING_RULE } from '#app/lib/matching-rule';
import { ComprehensionStatus } from '#app/components/comprehension-status';
import { useSessionView } from '#app/components/live/use-session';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, ButtonLink, Notice } from '#app/components/ui';
import { getSession } from '#app/models/live.server';
import { env } from '#app/utils/env.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { SessionStatusWord } from '#app/components/session-status';
import type { SessionStatus } from '#realtime/engine/types';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const session = await getSession(parseId(params.sessionId, 'session'));
  respondUnless(session?.courseId === course.id, 404, 'No such session in this course.');
  const d = session.design;
  return {
    course,
    role,
    session: {
      id: session.id,
      treatment: session.treatment,
      joinCode: session.joinCode,
      seed: session.seed,
      simulated: session.simulated,
      status: session.status,
    },
    joinUrl: session.joinCode ? new URL(`/join/${session.joinCode}`, env().APP_URL).toString() : null,
    design: {
      delta: d.delta,
      supergames: d.supergames,
      roundSeconds: d.roundSeconds,
      payoffs: d.payoffs,
      labels: d.labels,
      comprehension: d.comprehension,
    },
  };
}

const pct = (x: number | null) => (x === null ? '—' : `${Math.round(x * 100)} %`);

type Command = 'start' | 'pause' | 'resume' | 'end-after-supergame' | 'end-now' | 'cancel';
/** What each command did, in words (the status line above says where the session is). */
const DONE: Record<Command, string> = {
  start: 'Started: phones are being paired for supergame 1.',
  pause: 'Paused: every timer is stopped until you resume.',
  resume: 'Resumed: the timers run again.',
  'end-after-supergame': 'The session will end when the current supergame is over.',
  'end-now': 'Ended: everyone sees their final points.',
  cancel: 'Cancelled: the join code no longer works, and the phones in the lobby are told.',
};

export default function Conductor({ loaderData }: Route.ComponentProps) {
  const { course, role, session, design, joinUrl } = loaderData;
  const canSeeFloor = role === 'instructor' || role === 'assistant';
  const { view, connected, error, ask } = useSessionView(session.id, canSeeFloor ? 'floor' : 'big-screen', null);
  // A command's own result, shown while the session is still in the state the command left it
  // in: once the state moves on (the supergame ends, the session completes) the line goes.
  const [message, setMessage] = useState<{ ok: boolean; text: string; status: SessionStatus } | null>(null);
  const status = view?.status ?? session.status;
  const isInstructor = role === 'instructor';

  // A command usually removes the button that sent it (Start goes once the session runs), which
  // drops keyboard focus to the page's top; the status line takes it instead, so Tab goes on
  // from the controls and a screen reader stays where it was.
  const statusLine = useRef<HTMLParagraphElement>(null);
  const commanded = useRef(false);
  useEffect(() => {
    if (commanded.current && (document.activeElement === document.body || document.activeElement === null)) statusLine.current?.focus();
  }, [status]);

  const command = async (c: Command, confirmText?: string) => {
    if (confirmText && !window.confirm(confirmText)) return;
    commanded.current = true;
    const res = await ask((s) => s.emitWithAck('session:control', { sessionId: session.id, command: c }));
    setMessage(res.ok ? { ok: true, text: DONE[c], status: res.data.status } : { ok: false, text: res.message, status });
  };
  const floor = view?.kind === 'floor' ? view : null;
  const shown = message && message.status === status ? message : null;

  return (
    <>
      <PageHeader
        title={`Session #${session.id}: ${session.treatment}`}
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/sessions`, label: 'Sessions' }]} />}
      >
        {canSeeFloor ? (
          <ButtonLink to={`/courses/${course.id}/sessions/${session.id}/floor`} variant="secondary">
            Floor
          </ButtonLink>
        ) : null}
        <ButtonLink to={`/screen/${session.id}`} variant="secondary" target="_blank" rel="noreferrer">
          Big screen ↗
        </ButtonLink>
        <ButtonLink to={`/courses/${course.id}/debrief/${session.id}`} variant={status === 'complete' ? 'primary' : 'secondary'}>
          Debrief
        </ButtonLink>
      </PageHeader>
      {session.simulated ? (
        <Notice title="Simulated session">
          The choices of this demo session were simulated from a stated strategy mixture; nobody played it.
        </Notice>
      ) : null}
      <div className="mt-4 grid gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,24rem)]">
        <section aria-labelledby="conductor-title" className="flex flex-col gap-4 rounded-lg border border-slate-200 bg-white p-4">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <h2 id="conductor-title" className="text-lg font-semibold">
              Conductor
            </h2>
            <p className="text-sm text-slate-600" aria-live="polite">
              <span aria-hidden="true">{connected ? '●' : '○'} </span>
              {connected ? 'Live' : 'Connecting…'}
            </p>
          </div>
          <p ref={statusLine} tabIndex={-1} className="text-2xl font-semibold" data-testid="session-status" role="status">
            <SessionStatusWord status={status} />
          </p>
          {error ? <Notice tone="error">{error}</Notice> : null}
          <div className="flex flex-wrap gap-2">
            {isInstructor && status === 'open' ? (
              <>
                <Button onClick={() => command('start')}>Start the session</Button>
                <Button
                  variant="danger"
                  onClick={() =>
                    command(
                      'cancel',
                      'Cancel this session? Its join code stops working and the phones in the lobby are told. It cannot be started afterwards.',
                    )
                  }
                >
                  Cancel the session
                </Button>
              </>
            ) : null}
            {status === 'running' && canSeeFloor ? (
              <Button variant="secondary" onClick={() => command('pause')}>
                Pause
              </Button>
            ) : null}
            {status === 'paused' && canSeeFloor ? <Button onClick={() => command('resume')}>Resume</Button> : null}
            {isInstructor && (status === 'running' || status === 'paused') ? (
              <>
                <Button variant="secondary" onClick={() => command('end-after-supergame')} disabled={floor?.endAfterSupergame}>
                  {floor?.endAfterSupergame ? 'Ends after this supergame' : 'End after this supergame'}
                </Button>
                <Button
                  variant="danger"
                  onClick={() => command('end-now', 'End the session now? Open rounds are dropped and everyone sees their final points.')}
                >
                  End now
                </Button>
              </>
            ) : null}
          </div>
          <div aria-live="polite">{shown ? <Notice tone={shown.ok ? 'ok' : 'error'}>{shown.text}</Notice> : null}</div>
          {floor ? (
            <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4" data-testid="live-counts">
              {[
                ['Joined', String(floor.counts.joined)],
                ['Connected', String(floor.counts.connected)],
                ['Supergame', floor.supergame ? `${floor.supergame} of ${floor.supergames}` : `— of ${floor.supergames}`],
                ['Pairs done', `${floor.counts.pairsDone} of ${floor.counts.pairs}`],
                ['Cooperation, latest round', pct(floor.currentCooperation.rate)],
                ['Alerts', String(floor.alerts.length)],
              ].map(([k, v]) => (
                <div key={k} className="rounded-lg border border-slate-200 p-3">
                  <dt className="text-sm text-slate-600">{k}</dt>
                  <dd className="num text-2xl font-semibold">{v}</dd>
                </div>
              ))}
            </dl>
          ) : null}
        </section>
        <aside className="flex flex-col gap-4">
          {session.joinCode && (status === 'open' || status === 'running' || status === 'paused') ? (
            <section aria-labelledby="join-title" className="rounded-lg border border-slate-200 bg-white p-4">
              <h2 id="join-title" className="mb-2 text-lg font-semibold">
                Join
              </h2>
              <p className="font-mono text-4xl font-bold tracking-[0.2em]" data-testid="join-code">
                {session.joinCode}
              </p>
              <p className="mt-2 text-sm break-all text-slate-600">{joinUrl}</p>
            </section>
          ) : null}
          {design.comprehension && canSeeFloor ? (
            <ComprehensionStatus
              courseId={course.id}
              sessionId={session.id}
              live={status === 'open' || status === 'running' || status === 'paused'}
            />
          ) : null}
          <section aria-labelledby="frozen-title" className="rounded-lg border border-slate-200 bg-white p-4 text-sm">
            <h2 id="frozen-title" className="mb-2 text-lg font-semibold">
              Frozen design
            </h2>
            <p className="num">
              T {design.payoffs.T} · R {design.payoffs.R} · P {design.payoffs.P} · S {design.payoffs.S} · δ = {design.delta} ·{' '}
              {design.supergames} supergames · {design.roundSeconds} s a round
            </p>
            <p className="mt-1 text-slate-600">
              Seed <span className="font-mono">{session.seed}</span> (type it when opening another session to reuse these draws)
            </p>
            <p className="mt-2 text-slate-700">
              <span className="font-semibold">Matching.</span> {MATCHING_RULE}
            </p>
            <p className="mt-2">
              <Link to={`/courses/${course.id}/sessions`} className="font-semibold text-accent-700 underline">
                All sessions
              </Link>
            </p>
          </section>
        </aside>
      </div>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Session #${data?.session.id ?? ''} · Conductor · Parley` }];
