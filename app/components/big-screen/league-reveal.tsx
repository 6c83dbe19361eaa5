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

/** What step s shows: 0 the title, 1…n the bottom s entries, n + 1 the evolution chart. */
export function revealStep(step: number, n: number) {
  if (step <= 0) return { kind: 'title' as const };
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
  simulated?: boolean;
}) {
  const n = entries.length;
  const last = n + 1;
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
      <p className="text-slate-400">Keys: → next, ← back.</p>
    </div>
  );
}
