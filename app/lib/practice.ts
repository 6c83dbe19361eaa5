/**
 * The practice supergame before play (design option `practice`): the phone plays against a
 * library automaton, with the design's payoffs and draw rule, and nothing is sent or stored
 * (docs/decisions/028). Pure, so the page and its test play the same game.
 */
import { type Action, type Automaton, profileOf } from './automata';
import type { Design } from './design';
import { drawRule } from './draws';
import { profilePoints } from './stage-game';

/** A practice supergame stops here even if the draws would go on: it is a rehearsal, not a game. */
export const PRACTICE_MAX_ROUNDS = 5;

export interface PracticeRound {
  round: number;
  own: Action;
  computer: Action;
  ownPoints: number;
  computerPoints: number;
  draw: number;
  /** the draw's verdict: ≤ cut-off means another round */
  another: boolean;
  /** the practice goes on (another round by the draw, and below the cap) */
  goesOn: boolean;
}

/** The action an automaton plays after the observed history (its own actions first). */
export function automatonNext(a: Automaton, own: readonly Action[], partner: readonly Action[]): Action {
  let s = 0;
  for (let t = 0; t < own.length; t++) s = a.states[s].next[profileOf(own[t], partner[t])];
  return a.states[s].action;
}

/** One practice round: my choice, the computer's by its rule, the points, and the draw (1…max). */
export function playPracticeRound(
  d: Pick<Design, 'payoffs' | 'delta'>,
  computer: Automaton,
  history: readonly PracticeRound[],
  own: Action,
  draw: number,
): PracticeRound {
  const c = automatonNext(
    computer,
    history.map((r) => r.computer),
    history.map((r) => r.own),
  );
  const [ownPoints, computerPoints] = profilePoints(d.payoffs, own, c);
  const round = history.length + 1;
  const another = draw <= drawRule(d.delta).cutoff;
  return { round, own, computer: c, ownPoints, computerPoints, draw, another, goesOn: another && round < PRACTICE_MAX_ROUNDS };
}
