// The practice supergame (design option `practice`): on the phone only, against a disclosed computer
// rule, with the design's payoffs and draw rule. Nothing is sent while practising; the form at the
// bottom joins the session (and works without JavaScript, skipping the practice).
import { useEffect, useState } from 'react';
import { data, Form, redirect, useNavigation } from 'react-router';
import type { Route } from './+types/join-practice';
import { PayoffTable } from '#app/components/live/payoff-table';
import { ParticipantShell } from '#app/components/shells';
import { Button, Notice } from '#app/components/ui';
import { type Action, libraryStrategy } from '#app/lib/automata';
import { computerStrategyOf } from '#app/lib/design';
import { drawRule } from '#app/lib/draws';
import { payoffRows } from '#app/lib/instructions';
import { strategyInWords } from '#app/lib/strategy-words';
import { playPracticeRound, PRACTICE_MAX_ROUNDS, type PracticeRound } from '#app/lib/practice';
import { hasPassed } from '#app/models/comprehension.server';
import { requireUser } from '#app/utils/auth.server';
import { admission, carriedConsent, joinNow, sendJoinedToPlay } from '#app/utils/join.server';

async function guard(request: Request, rawCode: string) {
  const user = await requireUser(request);
  const code = rawCode.toUpperCase();
  const { session, refusal } = await admission(code, user);
  if (refusal || !session.design.practice) throw redirect(`/join/${code}`);
  // The check comes first when the design has one: no way round it through this page.
  if (session.design.comprehension && !(await hasPassed(session.id, user.id))) throw redirect(`/join/${code}`);
  return { user, code, session };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, code, session } = await guard(request, params.code);
  await sendJoinedToPlay(session, user);
  const d = session.design;
  const consent = carriedConsent(d, new URL(request.url).searchParams.get('consent'));
  if (consent === 'missing') throw redirect(`/join/${code}`);
  // The practice partner plays the design's computer rule, or tit-for-tat where the design has none.
  const strategy = computerStrategyOf(d);
  return {
    email: user.email,
    consent,
    strategy,
    computerWords: strategyInWords(strategy, d.labels),
    game: { payoffs: d.payoffs, delta: d.delta },
    drawMax: drawRule(d.delta).max,
    cutoff: drawRule(d.delta).cutoff,
    labels: d.labels,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { user, code, session } = await guard(request, params.code);
  const consent = carriedConsent(session.design, (await request.formData()).get('consent'));
  if (consent === 'missing') throw redirect(`/join/${code}`);
  const { error } = await joinNow(session, user.id, consent);
  return data({ error }, { status: 409 });
}

/** The two actions: label plus a distinct shape, equal neutral colours (as on the game screen). */
const SHAPES: Record<Action, string> = { C: '◆', D: '●' };

export default function Practice({ loaderData, actionData }: Route.ComponentProps) {
  const { labels, game, cutoff, drawMax, computerWords, consent } = loaderData;
  const busy = useNavigation().state === 'submitting';
  const [rounds, setRounds] = useState<PracticeRound[]>([]);
  // The practice runs in the page's script: until it has loaded a tap would do nothing, so the
  // buttons say they are not ready rather than swallow it.
  const [ready, setReady] = useState(false);
  useEffect(() => setReady(true), []);
  const last = rounds.at(-1);
  const over = last !== undefined && !last.goesOn;
  const table = payoffRows(game.payoffs);
  const choose = (a: Action) => {
    // A draw on the phone, like the room's draw: a whole number from 1 to drawMax.
    const draw = 1 + Math.floor(Math.random() * drawMax);
    setRounds((h) => [...h, playPracticeRound(game, libraryStrategy(loaderData.strategy), h, a, draw)]);
  };
  return (
    <ParticipantShell email={loaderData.email}>
      <p
        className="self-start rounded-full border-2 border-dashed border-slate-500 px-3 py-1 text-sm font-bold tracking-wide text-slate-800 uppercase"
        data-testid="practice-label"
      >
        Practice — not recorded
      </p>
      <header className="flex flex-col gap-1">
        <h1 className="text-2xl font-semibold">Practise against the computer</h1>
        <p className="text-slate-700">
          Your partner here is a computer that {computerWords}. Nothing you choose is sent or stored, and it earns no points. Up to{' '}
          {PRACTICE_MAX_ROUNDS} rounds.
        </p>
      </header>
      <PayoffTable table={table} labels={labels} />
      <section aria-live="polite" className="flex flex-col gap-2" data-testid="practice-rounds">
        {rounds.map((r) => (
          <p key={r.round} className="rounded-lg border border-slate-200 bg-white p-3">
            Practice round {r.round}: you {SHAPES[r.own]} {labels[r.own]}, computer {SHAPES[r.computer]} {labels[r.computer]} → you would
            get <strong className="num">{r.ownPoints}</strong>, the computer <span className="num">{r.computerPoints}</span>.{' '}
            <strong>
              Draw {r.draw} {r.another ? `≤ ${cutoff} — another round` : `> ${cutoff} — the supergame ends`}
            </strong>
            {r.another && !r.goesOn ? ` (the practice stops after ${PRACTICE_MAX_ROUNDS} rounds)` : ''}.
          </p>
        ))}
      </section>
      {over ? (
        <div className="flex flex-col gap-3">
          <p className="text-lg font-semibold">Practice over. In the session the draw alone decides when a supergame ends.</p>
          <Button variant="secondary" onClick={() => setRounds([])}>
            Practise again
          </Button>
        </div>
      ) : (
        <div className="flex flex-col gap-2">
          <p className="text-center text-lg">Practice round {rounds.length + 1}: choose</p>
          <div className="grid grid-cols-2 gap-3">
            {(['C', 'D'] as const).map((a) => (
              <button
                key={a}
                type="button"
                onClick={() => choose(a)}
                disabled={!ready}
                className="flex min-h-24 flex-col items-center justify-center gap-1 rounded-2xl border-2 border-dashed border-slate-400 bg-slate-100 text-3xl font-bold text-slate-900 active:bg-slate-200 disabled:opacity-60"
              >
                <span aria-hidden="true" className="text-3xl">
                  {SHAPES[a]}
                </span>
                {labels[a]}
              </button>
            ))}
          </div>
          <noscript>
            <p className="text-slate-700">The practice needs JavaScript; you can go to the lobby without it.</p>
          </noscript>
        </div>
      )}
      <Form method="post" className="mt-2 flex flex-col gap-2 border-t border-slate-200 pt-4">
        {consent ? <input type="hidden" name="consent" value={consent} /> : null}
        {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
        <Button type="submit" disabled={busy} className="min-h-16 text-xl">
          {busy ? 'Joining…' : rounds.length ? 'Done practising — join the session' : 'Skip the practice — join the session'}
        </Button>
      </Form>
    </ParticipantShell>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Practice — not recorded · Parley' }];
