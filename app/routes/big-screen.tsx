import QRCode from 'qrcode';
import type { Route } from './+types/big-screen';
import { useSessionView } from '#app/components/live/use-session';
import { formatCutoff } from '#app/lib/draws';
import { getSession } from '#app/models/live.server';
import { env } from '#app/utils/env.server';
import { parseId, requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { STATUS_WORDS } from '#app/utils/session-words';

// The projector page: join code, QR code and head-count while open; progress and the room's
// cooperation while running. Aggregates only: no pseudonym, no individual choice.
export async function loader({ request, params }: Route.LoaderArgs) {
  const session = await getSession(parseId(params.sessionId));
  if (!session) throw new Response('No such session.', { status: 404 });
  await requireCourseRole(request, String(session.courseId), STAFF_ROLES);
  const joinUrl = session.joinCode ? new URL(`/join/${session.joinCode}`, env().APP_URL).toString() : null;
  const qr = joinUrl ? await QRCode.toString(joinUrl, { type: 'svg', margin: 1, color: { dark: '#0f172a', light: '#ffffff' } }) : null;
  return {
    session: { id: session.id, treatment: session.treatment, joinCode: session.joinCode, simulated: session.simulated },
    joinUrl,
    joinHost: new URL(env().APP_URL).host,
    qr,
    labelC: session.design.labels.C,
    cutoff: formatCutoff(session.design.delta),
  };
}

export default function BigScreen({ loaderData }: Route.ComponentProps) {
  const { session, qr, joinHost, labelC, cutoff } = loaderData;
  const { view, connected } = useSessionView(session.id, 'big-screen', null);
  const screen = view && 'cooperationByRound' in view ? view : null;
  const status = screen?.status ?? 'open';
  const lobby = status === 'open' || status === 'draft';
  return (
    <div className="min-h-dvh bg-slate-950 p-8 text-slate-50">
      <div className="mx-auto flex max-w-6xl flex-col gap-8">
        <header className="flex flex-wrap items-baseline justify-between gap-4">
          <p className="text-2xl font-semibold text-accent-200">Parley</p>
          <p className="text-xl text-slate-300">
            <span aria-hidden="true">{STATUS_WORDS[status].icon} </span>
            {STATUS_WORDS[status].word}
            {connected ? '' : ' · reconnecting…'}
          </p>
        </header>
        {session.simulated ? <p className="text-xl text-slate-300">Simulated demo session</p> : null}
        {lobby && session.joinCode ? (
          <section className="grid items-center gap-10 md:grid-cols-[1fr_auto]" aria-label="How to join">
            <div className="flex flex-col gap-6">
              <p className="text-3xl">On your phone, open</p>
              <p className="text-5xl font-semibold text-accent-200">{joinHost}/join</p>
              <p className="text-3xl">and type the code</p>
              <p className="font-mono text-8xl font-bold tracking-[0.25em]" data-testid="big-join-code">
                {session.joinCode}
              </p>
            </div>
            {qr ? <div className="w-72 rounded-xl bg-white p-3" role="img" aria-label="QR code of the join link" dangerouslySetInnerHTML={{ __html: qr }} /> : null}
          </section>
        ) : null}
        <section className="grid gap-6 md:grid-cols-3" aria-label="Progress">
          <div className="rounded-xl border border-slate-700 p-6">
            <p className="text-xl text-slate-300">Joined</p>
            <p className="num text-7xl font-bold" data-testid="big-joined">
              {screen?.joined ?? 0}
            </p>
          </div>
          {!lobby && screen ? (
            <>
              <div className="rounded-xl border border-slate-700 p-6">
                <p className="text-xl text-slate-300">Supergame</p>
                <p className="num text-7xl font-bold">
                  {screen.supergame} <span className="text-3xl text-slate-400">of {screen.supergames}</span>
                </p>
              </div>
              <div className="rounded-xl border border-slate-700 p-6">
                <p className="text-xl text-slate-300">Pairs done</p>
                <p className="num text-7xl font-bold">
                  {screen.pairsDone} <span className="text-3xl text-slate-400">of {screen.pairs}</span>
                </p>
              </div>
            </>
          ) : null}
        </section>
        {!lobby && screen ? (
          <section aria-labelledby="coop" className="flex flex-col gap-4">
            <h2 id="coop" className="text-3xl font-semibold">
              Share choosing {labelC}, by round of this supergame
            </h2>
            <ol className="flex flex-col gap-2">
              {screen.cooperationByRound.map((r) => (
                <li key={r.round} className="grid grid-cols-[8rem_1fr_6rem] items-center gap-4 text-2xl">
                  <span>Round {r.round}</span>
                  <span className="h-8 rounded bg-slate-800" aria-hidden="true">
                    <span className="block h-8 rounded bg-accent-300" style={{ width: `${Math.round((r.rate ?? 0) * 100)}%` }} />
                  </span>
                  <span className="num text-right">{r.rate === null ? '—' : `${Math.round(r.rate * 100)} %`}</span>
                </li>
              ))}
            </ol>
            {screen.drawsShown.length ? (
              <p className="text-2xl text-slate-300">
                Draws so far: <span className="num font-semibold text-slate-50">{screen.drawsShown.join(' · ')}</span> (another round while ≤ {cutoff})
              </p>
            ) : null}
          </section>
        ) : null}
      </div>
    </div>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Big screen · session #${data?.session.id ?? ''} · Parley` }];
