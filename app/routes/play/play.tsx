import { useEffect, useRef, useState } from 'react';
import { Link, redirect } from 'react-router';
import type { Route } from './+types/play';
import { PayoffTable } from '#app/components/live/payoff-table';
import { useChoiceOutbox } from '#app/components/live/use-choice-outbox';
import { useCountdown, useSessionView } from '#app/components/live/use-session';
import { ParticipantShell } from '#app/components/shells';
import { Notice } from '#app/components/ui';
import { getSession, participantKeyOf } from '#app/models/live.server';
import { requireUser } from '#app/utils/auth.server';
import { parseId, respond, respondUnless } from '#app/utils/http.server';
import { courseRoleOf, STAFF_ROLES } from '#app/utils/permissions.server';
import { runner } from '#app/utils/runner.server';
import type { Action } from '#app/lib/automata';
import { strategyInWords } from '#app/lib/strategy-words';
import { participantView } from '#realtime/engine/views';
import type { ParticipantView } from '#realtime/engine/types';

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  // One answer for "no such session" and "not yours": session ids are sequential, so anything
  // else tells a stranger which sessions exist, and a redirect would hand over the join code.
  const nothingHere = 'Nothing here.';
  const session = await getSession(parseId(params.sessionId, 'session'));
  respondUnless(session, 404, nothingHere);
  const state = await runner().state(session.id);
  const me = participantKeyOf(user.id);
  if (!state?.participants[me]) {
    const role = await courseRoleOf(session.courseId, user);
    const staff = role !== null && (STAFF_ROLES as readonly string[]).includes(role);
    // Staff of the course see the join code on the big screen anyway.
    if (staff && session.joinCode) throw redirect(`/join/${session.joinCode}`);
    if (staff) respond(403, 'You did not take part in this session.');
    respond(404, nothingHere);
  }
  return {
    email: user.email,
    sessionId: session.id,
    courseId: session.courseId,
    roundMs: session.design.roundSeconds * 1000,
    view: participantView(state, me),
    serverNow: Date.now(),
  };
}

/** The two actions: label plus a distinct shape, equal neutral colours (never colour alone). */
const SHAPES: Record<Action, string> = { C: '◆', D: '●' };

export default function Play({ loaderData }: Route.ComponentProps) {
  const {
    view: live,
    connected,
    ready,
    online,
    storageOk,
    ask,
    socket,
  } = useSessionView(loaderData.sessionId, 'participant', loaderData.view);
  const view = live ?? loaderData.view;
  const offset = useRef(loaderData.serverNow - Date.now()).current;
  const left = useCountdown(view.status === 'choosing' ? view.deadline : null, offset, loaderData.roundMs);
  const [nudge, setNudge] = useState<string | null>(null);
  const outbox = useChoiceOutbox({ sessionId: loaderData.sessionId, view, ready, storageOk, ask });
  // The first connection takes a moment after the page loads: no alarm until there was one.
  const [everConnected, setEverConnected] = useState(false);
  useEffect(() => {
    if (connected) setEverConnected(true);
  }, [connected]);
  const link: 'offline' | 'reconnecting' | 'connecting' | 'connected' = !online
    ? 'offline'
    : connected && storageOk
      ? 'connected'
      : everConnected || !storageOk
        ? 'reconnecting'
        : 'connecting';
  const linkDown = link === 'offline' || link === 'reconnecting';

  useEffect(() => {
    const s = socket.current;
    if (!s) return;
    const onNudge = (p: { message: string }) => setNudge(p.message);
    s.on('participant:nudge', onNudge);
    return () => {
      s.off('participant:nudge', onNudge);
    };
  }, [socket, connected]);
  useEffect(() => {
    setNudge(null);
  }, [view.supergame, view.round]);

  const labels = view.labels;
  const chosen = outbox.chosen;
  const waiting = outbox.waiting;
  const seconds = left === null ? null : Math.ceil(left / 1000);

  return (
    <ParticipantShell email={loaderData.email}>
      <div className="flex items-center justify-between text-sm text-slate-600" aria-live="polite">
        <span>
          You are <strong className="text-slate-900">{view.pseudonym}</strong>
        </span>
        <span data-testid="link-state">
          <span aria-hidden="true">{link === 'connected' ? '●' : '○'} </span>
          {link === 'connecting' ? 'connecting…' : link === 'reconnecting' ? 'reconnecting…' : link}
        </span>
      </div>
      {linkDown && view.status !== 'finished' ? (
        <LinkBanner link={link} storageOk={storageOk} choosing={view.status === 'choosing' || view.status === 'waiting-partner'} />
      ) : null}
      {view.paused ? (
        <Notice tone="warn" title="Paused">
          The instructor paused the session. Your timer is stopped.
        </Notice>
      ) : null}
      {nudge ? <Notice tone="warn">{nudge}</Notice> : null}
      {outbox.note ? <Notice tone={outbox.note.tone}>{outbox.note.text}</Notice> : null}

      {view.status === 'lobby' ? (
        <section className="flex flex-col gap-4" aria-live="polite">
          <h1 className="text-3xl font-semibold">You are in</h1>
          <p className="text-lg text-slate-700">
            {view.notice === 'waiting-to-enter'
              ? 'The session is running. You will be paired from the next supergame on.'
              : 'Waiting for the instructor to start. Keep this page open; it updates by itself.'}
          </p>
          <PayoffTable table={view.payoffTable} labels={labels} />
        </section>
      ) : null}

      {view.status === 'choosing' || view.status === 'waiting-partner' ? (
        <section className="flex flex-1 flex-col gap-4" aria-live="polite">
          <div className="flex items-baseline justify-between">
            <h1 className="text-2xl font-semibold" data-testid="round-title">
              Supergame {view.supergame} of {view.supergames} · Round {view.round}
            </h1>
            {seconds !== null && !view.paused ? (
              <span className="num text-xl font-semibold" aria-label={`${seconds} seconds left`} aria-live="off" data-testid="countdown">
                {seconds} s
              </span>
            ) : null}
          </div>
          {view.partner?.kind === 'computer' ? (
            <Notice title="Your partner is a computer">
              <span data-testid="computer-partner">
                {view.partner.reason === 'hand-over'
                  ? `The participant you were paired with left${view.partner.fromRound > 1 ? ` after round ${view.partner.fromRound - 1}` : ''}, so for the rest of this supergame your partner is a computer that ${strategyInWords(view.partner.strategy, labels)}.`
                  : `In this supergame your partner is a computer that ${strategyInWords(view.partner.strategy, labels)}.`}
              </span>
            </Notice>
          ) : null}
          {view.lastResult && (view.lastResult.supergame === view.supergame || view.history.length === 0) ? (
            <ResultLine r={view.lastResult} labels={labels} />
          ) : null}
          {view.blockNotice ? <Notice>{view.blockNotice}</Notice> : null}
          <PayoffTable table={view.payoffTable} labels={labels} />
          <History view={view} />
          <div className="mt-auto flex flex-col gap-3 pt-2">
            {waiting ? (
              <p className="text-center text-lg" aria-live="polite" data-testid="outbox">
                Your choice (
                <strong>
                  {SHAPES[waiting.action]} {labels[waiting.action]}
                </strong>
                ){' '}
                {link === 'offline'
                  ? 'will be sent when you are back online.'
                  : linkDown
                    ? 'will be sent when the connection is back.'
                    : 'is being sent…'}
              </p>
            ) : chosen ? (
              <p className="text-center text-lg" aria-live="polite" data-testid="waiting">
                You chose{' '}
                <strong>
                  {SHAPES[chosen]} {labels[chosen]}
                </strong>
                . {view.partnerHasChosen ? 'Your partner has chosen too.' : 'Waiting for your partner…'}
              </p>
            ) : linkDown ? (
              <p className="text-center text-lg" aria-live="polite" data-testid="choose-offline">
                Choose: your tap is kept on this phone and sent{' '}
                {link === 'offline' ? 'when you are back online' : 'when the connection is back'}.
              </p>
            ) : (
              <p className="text-center text-lg">Choose:</p>
            )}
            <div className="grid grid-cols-2 gap-3">
              {(['C', 'D'] as const).map((a) => (
                <button
                  key={a}
                  type="button"
                  onClick={() => outbox.choose(a)}
                  disabled={Boolean(chosen) || view.paused}
                  aria-pressed={chosen === a}
                  className="flex min-h-32 flex-col items-center justify-center gap-1 rounded-2xl border-2 border-slate-400 bg-slate-100 text-3xl font-bold text-slate-900 active:bg-slate-200 disabled:opacity-60 aria-pressed:border-accent-700 aria-pressed:bg-accent-50 aria-pressed:opacity-100"
                >
                  <span aria-hidden="true" className="text-4xl">
                    {SHAPES[a]}
                  </span>
                  {labels[a]}
                </button>
              ))}
            </div>
          </div>
        </section>
      ) : null}

      {view.status === 'between-supergames' ? (
        <section className="flex flex-col gap-4" aria-live="polite">
          <h1 className="text-2xl font-semibold">
            {view.notice === 'sitting-out'
              ? 'You sit out this supergame'
              : view.notice === 'handed-to-computer'
                ? view.pairId
                  ? 'A computer plays for you in this supergame'
                  : 'You are not paired in this supergame'
                : `Supergame ${view.supergame} is over`}
          </h1>
          {view.lastResult ? <ResultLine r={view.lastResult} labels={labels} /> : null}
          <p className="text-lg text-slate-700">
            {view.notice === 'sitting-out'
              ? 'The head-count is odd, so one participant sits out each supergame, in turn. You play again in the next one.'
              : view.notice === 'handed-to-computer'
                ? view.pairId
                  ? `You were away, so a computer took your seat for the rest of supergame ${view.supergame}, and your partner was told. The supergame goes on without you; the rounds the computer plays are not yours and earn you no points.`
                  : 'A computer took your seat in an earlier supergame while you were away, so you are not in the pairs of this one.'
                : 'Waiting for the other pairs to finish. You will get a new partner.'}
          </p>
          <p className="num text-xl">
            Your points so far: <strong>{view.totalPoints}</strong>
          </p>
          <History view={view} />
        </section>
      ) : null}

      {view.status === 'finished' ? (
        <section className="flex flex-col gap-4" aria-live="polite">
          <h1 className="text-3xl font-semibold">{view.notice === 'cancelled' ? 'The session was cancelled' : 'The session is over'}</h1>
          {view.notice === 'cancelled' ? (
            <p className="text-slate-700">The instructor called it off before it started. Nothing was recorded.</p>
          ) : null}
          {view.notice === 'ended-early' ? <p className="text-slate-700">The instructor ended it early.</p> : null}
          {view.notice === 'removed' ? <p className="text-slate-700">The instructor took you out of the session.</p> : null}
          {view.notice === 'cancelled' ? null : (
            <>
              <p className="num text-2xl" data-testid="final-points">
                Your points: <strong>{view.totalPoints}</strong>
              </p>
              <p className="text-slate-700">Thank you for taking part.</p>
              <Link
                to={`/courses/${loaderData.courseId}/debrief/${loaderData.sessionId}/mine`}
                className="inline-flex min-h-14 items-center justify-center rounded-lg bg-accent-700 px-4 text-lg font-semibold text-white"
              >
                See your summary
              </Link>
            </>
          )}
        </section>
      ) : null}
    </ParticipantShell>
  );
}

/** Says what is wrong with the link and what happens to a tap meanwhile, in words, not only a dot. */
function LinkBanner({
  link,
  storageOk,
  choosing,
}: {
  link: 'offline' | 'reconnecting' | 'connecting' | 'connected';
  storageOk: boolean;
  choosing: boolean;
}) {
  if (link === 'offline') {
    return (
      <Notice tone="warn" title="You are offline">
        This phone has no network. Keep this page open: it reconnects by itself.
        {choosing ? ' A choice you tap now is kept on this phone and sent as soon as you are back online.' : ''}
      </Notice>
    );
  }
  return (
    <Notice tone="warn" title="Reconnecting…">
      {storageOk ? 'The connection to the game was lost.' : 'The game’s server is catching up.'} Keep this page open: it reconnects by
      itself.
      {choosing ? ' A choice you tap now is kept on this phone and sent as soon as the connection is back.' : ''}
    </Notice>
  );
}

function ResultLine({ r, labels }: { r: NonNullable<ParticipantView['lastResult']>; labels: { C: string; D: string } }) {
  return (
    <div className="rounded-lg border border-slate-200 bg-white p-3" aria-live="polite" data-testid="last-result">
      {r.supergameOver ? <p className="text-sm font-semibold text-slate-600">Supergame {r.supergame} ended with this round</p> : null}
      <p className="text-base">
        Round {r.round}: you {SHAPES[r.own]} {labels[r.own]}, partner {SHAPES[r.partner]} {labels[r.partner]} → you get{' '}
        <strong className="num">{r.ownPayoff}</strong>, partner <span className="num">{r.partnerPayoff}</span>.
      </p>
      {r.drawSentence ? <p className="mt-1 font-semibold">{r.drawSentence}.</p> : null}
    </div>
  );
}

function History({ view }: { view: ParticipantView }) {
  if (!view.history.length) return null;
  return (
    <details className="rounded-lg border border-slate-200 bg-white p-3" open={view.history.length <= 4} aria-live="off">
      <summary className="cursor-pointer font-semibold">This supergame so far</summary>
      <table className="mt-2 w-full text-sm">
        <thead className="text-left text-slate-600">
          <tr>
            <th scope="col">Round</th>
            <th scope="col">You</th>
            <th scope="col">Partner</th>
            <th scope="col" className="text-right">
              Points
            </th>
            <th scope="col" className="text-right">
              Draw
            </th>
          </tr>
        </thead>
        <tbody>
          {view.history.map((h) => (
            <tr key={h.round} className="border-t border-slate-100">
              <td className="num py-1">{h.round}</td>
              <td>
                {view.labels[h.own]}
                {h.ownSource === 'timeout' ? <span className="text-slate-500"> (timed out)</span> : null}
              </td>
              <td>{view.labels[h.partner]}</td>
              <td className="num text-right">{h.ownPayoff}</td>
              <td className="num text-right">{h.draw ?? '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </details>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Playing · Parley' }];
