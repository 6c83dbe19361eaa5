/**
 * Exact expected payoffs of one automaton against another (methods.md §4).
 *
 * The joint state w = (state of a, state of b) is a Markov chain: each intended action flips
 * with probability ε (execution error, also in round 1), and both automata move on the OBSERVED
 * profile (methods.md §3 convention). V(w) = ū(w) + δ Σ M(w,w') V(w'), so V solves
 * (I − δM)V = ū over the joint states reachable from (0,0).
 */
import type { Automaton } from './automata';
import { compileAutomaton, type CompiledAutomaton } from './automaton-check';
import { solveLinear } from './numeric';
import { payoffTable, type StageGame } from './stage-game';

export interface JointSystem {
  /** reachable joint states; index 0 is (0, 0) */
  states: [number, number][];
  /** I − δM, dense */
  matrix: number[][];
  /** ū: expected stage payoff of a's player in each joint state */
  rhs: number[];
}

function checkArgs(delta: number, epsilon: number): void {
  if (!(delta > 0 && delta < 1)) throw new RangeError(`δ must lie strictly between 0 and 1 (got ${delta})`);
  if (!(epsilon >= 0 && epsilon <= 1)) throw new RangeError(`ε must lie in [0, 1] (got ${epsilon})`);
}

/** Builds (I − δM) and ū for a (row player) against b. */
export function jointSystem(
  a: Automaton | CompiledAutomaton,
  b: Automaton | CompiledAutomaton,
  game: StageGame,
  delta: number,
  epsilon = 0,
): JointSystem {
  checkArgs(delta, epsilon);
  const A = 'act' in a ? a : compileAutomaton(a);
  const B = 'act' in b ? b : compileAutomaton(b);
  const u = payoffTable(game);
  const index = new Map<number, number>();
  const states: [number, number][] = [];
  const key = (i: number, j: number) => i * B.n + j;
  const add = (i: number, j: number) => {
    const k = key(i, j);
    let idx = index.get(k);
    if (idx === undefined) {
      idx = states.length;
      index.set(k, idx);
      states.push([i, j]);
    }
    return idx;
  };
  add(0, 0);

  // Outcomes per joint state: (probability, a's payoff, successor index).
  const outcomes: { p: number; pay: number; to: number }[][] = [];
  for (let w = 0; w < states.length; w++) {
    const [i, j] = states[w];
    const list: { p: number; pay: number; to: number }[] = [];
    for (let x = 0; x < 2; x++) {
      const px = x === A.act[i] ? 1 - epsilon : epsilon;
      if (px === 0) continue;
      for (let y = 0; y < 2; y++) {
        const py = y === B.act[j] ? 1 - epsilon : epsilon;
        if (py === 0) continue;
        // a sees (own x, partner y); b sees the mirror (own y, partner x)
        const to = add(A.next[i * 4 + x * 2 + y], B.next[j * 4 + y * 2 + x]);
        list.push({ p: px * py, pay: u[x * 2 + y], to });
      }
    }
    outcomes.push(list);
  }

  const n = states.length;
  const matrix: number[][] = [];
  const rhs: number[] = [];
  for (let w = 0; w < n; w++) {
    const row = new Array<number>(n).fill(0);
    row[w] = 1;
    let ubar = 0;
    for (const o of outcomes[w]) {
      row[o.to] -= delta * o.p;
      ubar += o.p * o.pay;
    }
    matrix.push(row);
    rhs.push(ubar);
  }
  return { states, matrix, rhs };
}

/**
 * V = Σ_t δ^(t−1) E[u_t] of a's player against b from (0,0): the expected total payoff of a
 * supergame. Source: methods.md §4.
 */
export function expectedTotal(
  a: Automaton | CompiledAutomaton,
  b: Automaton | CompiledAutomaton,
  game: StageGame,
  delta: number,
  epsilon = 0,
): number {
  const sys = jointSystem(a, b, game, delta, epsilon);
  return solveLinear(sys.matrix, sys.rhs)[0];
}

/** v = (1−δ)V, the per-round average (methods.md §0). */
export function perRoundValue(
  a: Automaton | CompiledAutomaton,
  b: Automaton | CompiledAutomaton,
  game: StageGame,
  delta: number,
  epsilon = 0,
): number {
  return (1 - delta) * expectedTotal(a, b, game, delta, epsilon);
}

/** A[j][k] = V of strategy j (row) against strategy k (column). */
export function valueMatrix(strategies: readonly Automaton[], game: StageGame, delta: number, epsilon = 0): number[][] {
  const compiled = strategies.map(compileAutomaton);
  return compiled.map((row) => compiled.map((col) => expectedTotal(row, col, game, delta, epsilon)));
}
