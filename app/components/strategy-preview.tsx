import { useMemo } from 'react';
import { type Action, type Automaton, libraryStrategy } from '#app/lib/automata';
import { leagueEntryIssues, previewPlay } from '#app/lib/league';
import type { StageGame } from '#app/lib/stage-game';

/** The opponents the preview plays by default: the two unconditional rules and two reciprocators. */
export const PREVIEW_OPPONENTS = ['ALLD', 'ALLC', 'TFT', 'Grim'] as const;

const fmt = (x: number) => String(Number(x.toFixed(2)));

function Moves({ moves, label }: { moves: Action[]; label: string }) {
  return (
    <span role="img" className="flex gap-0.5" aria-label={`${label}: ${moves.join(' ')}`}>
      {moves.map((m, t) => (
        <span
          key={t}
          aria-hidden
          className={`num inline-flex size-6 items-center justify-center rounded text-xs font-semibold ${
            m === 'C' ? 'bg-accent-100 text-accent-800' : 'bg-slate-700 text-white'
          }`}
        >
          {m}
        </span>
      ))}
    </span>
  );
}

/**
 * A strategy's first rounds against a few library strategies, without errors, and its exact
 * points per round against each at δ: what a participant sees while building a league entry.
 */
export function StrategyPreview({
  strategy,
  game,
  delta,
  rounds = 8,
  opponents = PREVIEW_OPPONENTS,
}: {
  strategy: Automaton;
  game: StageGame;
  delta: number;
  rounds?: number;
  opponents?: readonly string[];
}) {
  const valid = leagueEntryIssues(strategy).length === 0;
  const plays = useMemo(
    () => (valid ? opponents.map((id) => ({ id, ...previewPlay(strategy, libraryStrategy(id), game, delta, rounds) })) : []),
    [valid, opponents, strategy, game, delta, rounds],
  );
  if (!valid) return <p className="text-sm text-slate-600">The preview shows once the strategy has no problems left.</p>;
  return (
    <table className="text-sm" data-testid="strategy-preview">
      <caption className="mb-1 text-left font-semibold">
        First {rounds} rounds against library strategies (no mistakes), and points per round at δ = {delta}
      </caption>
      <thead className="sr-only">
        <tr>
          <th scope="col">Opponent</th>
          <th scope="col">Moves</th>
          <th scope="col">Points per round</th>
        </tr>
      </thead>
      <tbody>
        {plays.map((p) => (
          <tr key={p.id} className="border-t border-slate-100 align-middle">
            <th scope="row" className="py-1 pr-3 text-left font-semibold">
              vs {p.id}
            </th>
            <td className="py-1 pr-3">
              <div className="flex flex-col gap-0.5">
                <Moves moves={p.own} label="yours" />
                <Moves moves={p.partner} label={p.id} />
              </div>
            </td>
            <td className="num py-1 text-right">{fmt(p.perRound)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
