import QRCode from 'qrcode';
import type { Route } from './+types/big-screen';
import { ColumnChart, percent } from '#app/components/big-screen/column-chart';
import { DrawPanel } from '#app/components/big-screen/draw-panel';
import { JoinHero, JoinSide } from '#app/components/big-screen/join-panel';
import { CancelledSlide, ClosingSlide } from '#app/components/big-screen/slides';
import { useSessionView } from '#app/components/live/use-session';
import { getSession } from '#app/models/live.server';
import { env } from '#app/utils/env.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { runner } from '#app/utils/runner.server';
import { SessionStatusWord } from '#app/components/session-status';
import { bigScreenView } from '#realtime/engine/views';

// The projector page, for the back row of a lecture hall: the join code and QR code while people
// may still join and play; progress, the round's draw and the room's cooperation while running; a
// closing slide at the end. Aggregates only: no pseudonym, no individual choice.
export async function loader({ request, params }: Route.LoaderArgs) {
  const session = await getSession(parseId(params.sessionId, 'session'));
  respondUnless(session, 404, 'No such session.');
  await requireCourseRole(request, String(session.courseId), STAFF_ROLES);
  const joinUrl = session.joinCode ? new URL(`/join/${session.joinCode}`, env().APP_URL).toString() : null;
  const qr = joinUrl ? await QRCode.toString(joinUrl, { type: 'svg', margin: 1, color: { dark: '#0f172a', light: '#ffffff' } }) : null;
  // The first paint already shows the right screen (a closing slide, not a join code), before the
  // socket connects.
  const state = await runner().state(session.id);
  return {
    session: { id: session.id, status: session.status, joinCode: session.joinCode, simulated: session.simulated },
    joinHost: new URL(env().APP_URL).host,
    qr,
    labelC: session.design.labels.C,
    initial: state ? bigScreenView(state) : null,
  };
}

/**
 * Sizes are in em of a base that follows the screen: ≈ 30 px on a 1920×1080 projector (readable
 * from the back of a lecture hall; key numbers ≥ 2 em), 16 px on a phone.
 */
const BASE_FONT = 'clamp(16px, min(1.55vw, 2.8vh), 40px)';

function Stat({ label, value, of, testId }: { label: string; value: number; of?: number; testId?: string }) {
  return (
    <div className="flex flex-col rounded-xl border border-slate-700 px-[0.8em] py-[0.4em]">
      <p className="text-slate-300">{label}</p>
      <p className="num text-[2.2em] leading-tight font-bold">
        <span data-testid={testId}>{value}</span>
        {of !== undefined ? <span className="text-[0.5em] font-semibold text-slate-300"> of {of}</span> : null}
      </p>
    </div>
  );
}

export default function BigScreen({ loaderData }: Route.ComponentProps) {
  const { session, qr, joinHost, labelC, initial } = loaderData;
  const { view: screen, connected } = useSessionView(session.id, 'big-screen', initial);
  const status = screen?.status ?? session.status;
  const lobby = status === 'open' || status === 'draft';
  const live = status === 'running' || status === 'paused';
  const over = status === 'complete' || status === 'archived';
  // the view knows whether a joiner would still play; before it arrives, the stored status does
  const entersAt = screen ? screen.lateEntry : lobby ? 1 : null;
  const code = entersAt !== null ? session.joinCode : null;
  return (
    <main data-testid="big-screen" className="flex min-h-dvh w-full flex-col bg-slate-950 text-slate-50" style={{ fontSize: BASE_FONT }}>
      <header className="flex flex-wrap items-baseline justify-between gap-x-[1em] border-b border-slate-800 px-[1em] py-[0.4em]">
        <p className="font-semibold text-accent-200">
          Parley{session.simulated ? <span className="font-normal text-slate-300"> · simulated demo session</span> : null}
        </p>
        <p data-testid="big-status">
          <SessionStatusWord status={status} />
          {connected ? '' : ' · reconnecting…'}
        </p>
      </header>
      {status === 'paused' ? (
        <div
          data-testid="pause-banner"
          role="status"
          className="flex w-full flex-wrap items-baseline gap-x-[1em] bg-accent-200 px-[1em] py-[0.3em] text-slate-950"
        >
          <p className="text-[2.4em] leading-tight font-bold">
            <span aria-hidden="true">❚❚ </span>Paused
          </p>
          <p className="font-semibold">Round timers are stopped until the session resumes.</p>
        </div>
      ) : null}
      <div className="flex flex-1 flex-col gap-[0.8em] px-[1em] py-[0.8em]">
        {/* the closing and cancelled slides have their own visible heading */}
        {lobby || live ? <h1 className="sr-only">Big screen of session #{session.id}</h1> : null}
        {lobby ? (
          <div className="flex flex-1 flex-col justify-center gap-[1em]">
            {code ? <JoinHero code={code} host={joinHost} qr={qr} /> : null}
            <div className="flex justify-center">
              <Stat label="Joined" value={screen?.joined ?? 0} testId="big-joined" />
            </div>
          </div>
        ) : null}
        {live && screen ? (
          <div className="grid flex-1 gap-[0.8em] lg:grid-cols-[minmax(0,1fr)_auto]">
            <div className="flex min-w-0 flex-col gap-[0.6em]">
              <div className="grid grid-cols-3 gap-[0.6em]">
                <Stat label="Supergame" value={screen.supergame} of={screen.supergames} />
                <Stat label="Pairs done" value={screen.pairsDone} of={screen.pairs} />
                <Stat label="Joined" value={screen.joined} testId="big-joined" />
              </div>
              <DrawPanel draw={screen.latestDraw} rule={screen.drawRule} currentSupergame={screen.supergame} />
              <section aria-labelledby="coop" className="flex min-h-[10em] flex-1 flex-col gap-[0.3em]">
                <h2 id="coop" className="font-semibold">
                  Share choosing {labelC}, by round of supergame {screen.supergame}
                </h2>
                {screen.cooperationByRound.length ? (
                  <ColumnChart
                    testId="chart-round"
                    rows={['Round']}
                    columns={screen.cooperationByRound.map((r) => ({
                      key: r.round,
                      rate: r.rate,
                      text: `Round ${r.round}: ${r.rate === null ? 'no own choices' : `${percent(r.rate)} chose ${labelC}`}.`,
                      below: [String(r.round)],
                    }))}
                  />
                ) : (
                  <p
                    data-testid="chart-placeholder"
                    className="flex flex-1 items-center justify-center rounded-xl border border-dashed border-slate-600 px-[1em] text-center text-slate-300"
                  >
                    Round 1 of supergame {screen.supergame} is being played. The chart fills in as pairs finish their rounds.
                  </p>
                )}
              </section>
            </div>
            {code && entersAt !== null ? (
              <aside className="lg:w-[12em]">
                <JoinSide code={code} host={joinHost} qr={qr} entersAt={entersAt} />
              </aside>
            ) : null}
          </div>
        ) : null}
        {over && screen ? <ClosingSlide view={screen} labelC={labelC} /> : null}
        {status === 'cancelled' ? <CancelledSlide /> : null}
      </div>
    </main>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Big screen · session #${data?.session.id ?? ''} · Parley` }];
