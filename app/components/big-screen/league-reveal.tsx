// The league's reveal on the projector: a title slide, then the ranking from the bottom up, one
// entry per step (→, PageDown, a clicker or the Next button; ← goes back), then the evolution
// chart. Large type for the back row; aggregates only: entry names and scores, no e-mail address.
import { useCallback, useEffect, useState } from 'react';
import {
  type CompactEvolution,
  compactEvolution,
  EvolutionChart,
  type EvolutionInput,
  sharePct,
  sharesInWords,
} from '#app/components/league-charts';
import { cx } from '#app/components/ui';

export interface RevealEntry {
  rank: number;
  name: string;
  /** mean points per round over all entries, itself included */
  score: number;
  /** added by the instructor from the library, not by a participant */
  house?: boolean;
}

/** Rows the ranking shows at once; with more entries the earlier reveals scroll off the bottom. */
export const REVEAL_ROWS = 8;

const points = (x: number) => x.toFixed(2);

/**
 * The class beside the league: a session's estimated strategy mix, and what the league's entries
 * would earn against it (the estimate's error rate as execution error).
 */
export interface ClassSlide {
  /** the session in words: "Short horizon (δ = 1/2), session 1" */
  session: string;
  simulated: boolean;
  subjects: number;
  /** estimated shares, largest first (library strategies by name) */
  mix: { id: string; name: string; share: number }[];
  /** 1 − β */
  errorProbability: number;
  /** league entries against the class's mix, best first */
  entries: { name: string; value: number }[];
  /** the session's own payoffs and δ in words when they differ from the league's (null: the same game) */
  otherGame: string | null;
}

/** What step s shows: 0 the title, 1…n the bottom s entries, n + 1 the evolution chart, n + 2 the class (when there is one). */
export function revealStep(step: number, n: number) {
  if (step <= 0) return { kind: 'title' as const };
  if (step > n + 1) return { kind: 'class' as const };
  if (step > n) return { kind: 'evolution' as const };
  // entries are best first: step s reveals the last s of them
  return { kind: 'ranking' as const, from: n - step };
}

export function LeagueReveal({
  title,
  entries,
  evolution,
  settings,
  background,
  survivors,
  classSlide = null,
  simulated = false,
}: {
  title: string;
  /** best first, as ranked */
  entries: readonly RevealEntry[];
  evolution: EvolutionInput | CompactEvolution;
  /** entries with a share of at least 0.1 % in the last generation, largest first */
  survivors: readonly { name: string; share: number }[];
  /** the league's settings in words: "δ = 0.75, ε = 0.05, payoffs R 48 · S 12 · T 50 · P 25" */
  settings: string;
  /** the replicator's background fitness, stated under the chart */
  background: number;
  /** the class beside the league, shown last (the league kept a session with an estimate) */
  classSlide?: ClassSlide | null;
  simulated?: boolean;
}) {
  const n = entries.length;
  const last = classSlide ? n + 2 : n + 1;
  const [step, setStep] = useState(0);
  const go = useCallback((d: number) => setStep((s) => Math.min(last, Math.max(0, s + d))), [last]);
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (e.key === 'ArrowRight' || e.key === 'PageDown' || e.key === ' ') {
        e.preventDefault();
        go(1);
      } else if (e.key === 'ArrowLeft' || e.key === 'PageUp') {
        e.preventDefault();
        go(-1);
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [go]);
  const view = revealStep(step, n);
  const generations = compactEvolution(evolution).generation.at(-1) ?? 0;

  return (
    <div className="flex min-h-dvh flex-col gap-[0.8em] px-[1em] py-[0.6em]" data-testid="league-reveal" data-step={step}>
      <header className="flex flex-wrap items-center justify-between gap-[0.6em] border-b border-slate-800 pb-[0.4em]">
        <p className="font-semibold text-accent-200">
          Strategy league · {title}
          {simulated ? <span className="font-normal text-slate-300"> · simulated demo data</span> : null}
        </p>
        <nav aria-label="Reveal" className="flex items-center gap-[0.5em]">
          <button
            type="button"
            onClick={() => go(-1)}
            disabled={step === 0}
            className="min-h-14 rounded-lg border border-slate-500 px-[0.8em] font-semibold hover:bg-slate-800 disabled:opacity-40"
          >
            <span aria-hidden="true">←</span> Back
          </button>
          <span className="num text-slate-300" aria-live="polite" data-testid="reveal-position">
            {step} / {last}
          </span>
          <button
            type="button"
            onClick={() => go(1)}
            disabled={step === last}
            className="min-h-14 rounded-lg border border-slate-500 px-[0.8em] font-semibold hover:bg-slate-800 disabled:opacity-40"
          >
            Next <span aria-hidden="true">→</span>
          </button>
        </nav>
      </header>

      {view.kind === 'title' ? (
        <section className="flex flex-1 flex-col items-center justify-center gap-[0.6em] text-center">
          <h1 className="text-[3em] leading-tight font-bold">{title}</h1>
          <p className="text-[1.4em] text-slate-200">
            {n} {n === 1 ? 'entry' : 'entries'}; each met every entry, itself included, in supergames that go on after each round with
            probability δ.
          </p>
          <p className="text-[1.2em] text-slate-300">{settings}</p>
          <p className="text-slate-400">Press → to reveal the ranking from the bottom.</p>
        </section>
      ) : null}

      {view.kind === 'ranking' ? (
        <section aria-labelledby="reveal-ranking" className="flex flex-1 flex-col gap-[0.4em]">
          <h1 id="reveal-ranking" className="text-[2em] font-bold">
            Ranking <span className="text-[0.6em] font-normal text-slate-300">points per round, averaged over every opponent</span>
          </h1>
          {view.from > 0 ? (
            <p className="text-[1.2em] text-slate-300" data-testid="reveal-hidden">
              <span aria-hidden="true">▲ </span>
              {view.from} {view.from === 1 ? 'entry' : 'entries'} still to come
            </p>
          ) : null}
          <ol className="flex flex-col gap-[0.25em]" data-testid="reveal-rows">
            {entries.slice(view.from, view.from + REVEAL_ROWS).map((e, k) => (
              <li
                key={`${view.from + k}`}
                data-testid="reveal-row"
                className={cx(
                  'grid grid-cols-[3.5em_minmax(0,1fr)_auto] items-baseline gap-[0.6em] rounded-lg px-[0.6em] py-[0.2em]',
                  k === 0 ? 'bg-accent-200 text-slate-950' : 'bg-slate-900',
                )}
              >
                <span className="num text-[1.8em] font-bold">{e.rank}</span>
                <span className="truncate text-[1.6em] font-semibold">
                  {e.name}
                  {e.house ? <span className="text-[0.6em] font-normal"> · house entry</span> : null}
                </span>
                <span className="num text-[1.8em] font-bold">{points(e.score)}</span>
              </li>
            ))}
          </ol>
          {n - view.from > REVEAL_ROWS ? (
            <p className="text-slate-400">
              <span aria-hidden="true">▼ </span>
              {n - view.from - REVEAL_ROWS} more below
            </p>
          ) : null}
        </section>
      ) : null}

      {view.kind === 'evolution' ? (
        <section aria-labelledby="reveal-evolution" className="flex flex-1 flex-col gap-[0.4em]">
          <h1 id="reveal-evolution" className="text-[2em] font-bold">
            Evolution <span className="text-[0.6em] font-normal text-slate-300">over {generations} generations, from equal shares</span>
          </h1>
          <EvolutionChart evolution={evolution} theme="dark" big height="h-[60vh]" />
          <p className="text-[1.1em] text-slate-300">
            Each generation, an entry&apos;s share grows in proportion to its points per round against the population then (discrete
            replicator dynamics; Taylor &amp; Jonker 1978), with a background fitness of {background}. Still there at the end (share at
            least {sharePct(1e-3)}): {sharesInWords(survivors) || 'none'}.
          </p>
        </section>
      ) : null}
      {view.kind === 'class' && classSlide ? <ClassView c={classSlide} /> : null}
      <p className="text-slate-400">Keys: → next, ← back.</p>
    </div>
  );
}

function ClassView({ c }: { c: ClassSlide }) {
  const shown = c.mix.filter((m) => m.share >= 0.005);
  return (
    <section aria-labelledby="reveal-class" className="flex flex-1 flex-col gap-[0.6em]" data-testid="reveal-class">
      <h1 id="reveal-class" className="text-[2em] font-bold">
        And how did the class play?
      </h1>
      <p className="text-[1.1em] text-slate-300">
        Strategies estimated from the choices in {c.session} ({c.subjects} participants
        {c.simulated ? ', simulated demo data' : ''}; strategy-frequency estimation, Dal Bó &amp; Fréchette 2011). An estimate, with its own
        uncertainty: the shares are the most likely mix, not a count of people.
        {c.otherGame ? ` The session was played at ${c.otherGame}; its strategies are valued here at the league's payoffs and δ.` : ''}
      </p>
      <div className="grid flex-1 gap-[1em] lg:grid-cols-2">
        <div className="flex flex-col gap-[0.3em]">
          <h2 className="text-[1.3em] font-semibold">The class&apos;s estimated mix</h2>
          <ol className="flex flex-col gap-[0.25em]">
            {shown.map((m) => (
              <li key={m.id} className="grid grid-cols-[minmax(0,1fr)_auto] items-center gap-[0.6em]">
                <span className="relative overflow-hidden rounded bg-slate-900 px-[0.4em] py-[0.15em]">
                  <span
                    aria-hidden="true"
                    className="absolute inset-y-0 left-0 bg-accent-800"
                    style={{ width: `${Math.round(m.share * 100)}%` }}
                  />
                  <span className="relative text-[1.3em] font-semibold">{m.name}</span>
                </span>
                <span className="num w-[3.6em] text-right text-[1.5em] font-bold">{sharePct(m.share)}</span>
              </li>
            ))}
          </ol>
        </div>
        <div className="flex flex-col gap-[0.3em]">
          <h2 className="text-[1.3em] font-semibold">League entries in that population</h2>
          <p className="text-slate-300">
            Points per round against the class&apos;s mix, each intended move flipped with probability {c.errorProbability.toFixed(3)} (the
            estimate&apos;s error rate).
          </p>
          <ol className="flex flex-col gap-[0.25em]">
            {c.entries.slice(0, 6).map((e, k) => (
              <li
                key={k}
                className="grid grid-cols-[2em_minmax(0,1fr)_auto] items-baseline gap-[0.5em] rounded bg-slate-900 px-[0.5em] py-[0.15em]"
              >
                <span className="num text-[1.3em] font-bold">{k + 1}</span>
                <span className="truncate text-[1.3em] font-semibold">{e.name}</span>
                <span className="num text-[1.4em] font-bold">{points(e.value)}</span>
              </li>
            ))}
          </ol>
          {c.entries.length > 6 ? <p className="text-slate-400">and {c.entries.length - 6} more</p> : null}
        </div>
      </div>
    </section>
  );
}
