/**
 * Strategy checker (methods.md §4): for the symmetric profile (s, s), is it a Nash equilibrium,
 * is it subgame perfect, and for which δ ∈ (0,1)?
 *
 * - Nash: against s, the deviator's problem is a finite Markov decision problem over s's states
 *   (the deviator may play either action in every opponent state; the observed profile drives
 *   s's transitions). Solved exactly by policy iteration, each policy evaluated exactly.
 * - SPE: one-shot deviation principle (Mailath & Samuelson 2006, ch. 2 [mem]) at every joint
 *   state reachable from (0,0) under ANY action sequence. The reachable set is closed under
 *   swapping the two players (the start is symmetric and both use s), so checking player 1 at
 *   every reachable ordered pair also checks player 2.
 *
 * With ε = 0 every play path is deterministic, so values come from the geometric-series
 * formula on the path's cycle (pathValues), which is the exact solution of (I − δM)V = ū.
 *
 * Payoffs are normalised to R = 1, P = 0 (T = 1+g, S = −l) for the verdicts and intervals; the
 * equilibrium sets are invariant under this positive affine map and the tolerance then does not
 * depend on the payoffs' level. Reported values are in the design's own payoffs.
 */
import { PROFILES, type Action, type Automaton, type Profile } from './automata';
import { compileAutomaton, type CompiledAutomaton } from './automaton-check';
import { brentRoot, goldenMin, pathValues } from './numeric';
import { checkStageGame, payoffTable, type StageGame } from './stage-game';

/**
 * A profile "holds" at δ when the best gain ≤ TOL_REL × max|normalised payoff| / (1−δ).
 * The value scale is M/(1−δ) and the values carry a relative error of a few ulp per state on
 * the path, so this sits ~3 orders above the rounding noise; knife edges (gain touching 0) are
 * caught. The price: each closed end of a set is widened by about TOL_REL·(1−δ)·M/slope, a few
 * 1e-12 for ordinary payoffs (e.g. WSLS at R=2, T=3, S=−1, P=0 starts at 0.499999999997), far
 * inside the 1e-9 accuracy asked of the ends.
 */
export const TOL_REL = 1e-12;

/** Intervals narrower than this are reported as a single point (a knife edge). */
export const POINT_WIDTH = 1e-9;

/**
 * δ sample for the interval search: 1/200 steps plus points near both ends. Sets are assumed
 * constant on (0, 1e-4] and [1 − 1e-4, 1): a boundary beyond 0.9999 is not resolved.
 */
const GRID: Float64Array = (() => {
  const xs: number[] = [1e-4, 1e-3, 2.5e-3, 0.9975, 0.999, 0.9999];
  for (let k = 1; k < 200; k++) xs.push(k / 200);
  return Float64Array.from(xs.sort((a, b) => a - b));
})();

export interface DeltaInterval {
  lo: number;
  hi: number;
  loClosed: boolean;
  hiClosed: boolean;
}

interface Prepared {
  c: CompiledAutomaton;
  /** stage payoffs [R, S, T, P] in the units of this preparation */
  u: Float64Array;
  /** max |u| */
  M: number;
  // joint states reachable from (0,0) under any actions; index 0 = (0,0)
  nJ: number;
  ji: Int32Array;
  jj: Int32Array;
  /** BFS parent and the profile (player 1's view) that led here, for describing histories */
  parent: Int32Array;
  via: Int8Array;
  /** conforming play: successor and player 1's payoff */
  succ: Int32Array;
  rew: Float64Array;
  /** player 1 deviates once: successor and payoff */
  succDev: Int32Array;
  rewDev: Float64Array;
  // scratch
  V: Float64Array;
  mark: Uint8Array;
  stack: Int32Array;
  policy: Uint8Array;
  pSucc: Int32Array;
  pRew: Float64Array;
  W: Float64Array;
}

function prepare(c: CompiledAutomaton, u: Float64Array): Prepared {
  const { n, act, next } = c;
  const idx = new Int32Array(n * n).fill(-1);
  const ji: number[] = [];
  const jj: number[] = [];
  const parent: number[] = [];
  const via: number[] = [];
  const add = (i: number, j: number, from: number, code: number) => {
    const k = i * n + j;
    if (idx[k] < 0) {
      idx[k] = ji.length;
      ji.push(i);
      jj.push(j);
      parent.push(from);
      via.push(code);
    }
    return idx[k];
  };
  add(0, 0, -1, -1);
  for (let w = 0; w < ji.length; w++) {
    for (let x = 0; x < 2; x++) {
      for (let y = 0; y < 2; y++) add(next[ji[w] * 4 + x * 2 + y], next[jj[w] * 4 + y * 2 + x], w, x * 2 + y);
    }
  }
  const nJ = ji.length;
  const succ = new Int32Array(nJ);
  const rew = new Float64Array(nJ);
  const succDev = new Int32Array(nJ);
  const rewDev = new Float64Array(nJ);
  for (let w = 0; w < nJ; w++) {
    const i = ji[w];
    const j = jj[w];
    const x = act[i];
    const y = act[j];
    const xd = 1 - x;
    succ[w] = idx[next[i * 4 + x * 2 + y] * n + next[j * 4 + y * 2 + x]];
    rew[w] = u[x * 2 + y];
    succDev[w] = idx[next[i * 4 + xd * 2 + y] * n + next[j * 4 + y * 2 + xd]];
    rewDev[w] = u[xd * 2 + y];
  }
  const size = Math.max(nJ, n);
  return {
    c,
    u,
    M: Math.max(Math.abs(u[0]), Math.abs(u[1]), Math.abs(u[2]), Math.abs(u[3])),
    nJ,
    ji: Int32Array.from(ji),
    jj: Int32Array.from(jj),
    parent: Int32Array.from(parent),
    via: Int8Array.from(via),
    succ,
    rew,
    succDev,
    rewDev,
    V: new Float64Array(nJ),
    mark: new Uint8Array(size),
    stack: new Int32Array(size),
    policy: new Uint8Array(n).fill(1),
    pSucc: new Int32Array(n),
    pRew: new Float64Array(n),
    W: new Float64Array(n),
  };
}

/** Values of conforming play (s, s) at every reachable joint state, into P.V. */
function conformValues(P: Prepared, delta: number): Float64Array {
  return pathValues(P.succ, P.rew, delta, P.V, P.mark, P.stack, P.nJ);
}

/** Largest one-shot gain over the reachable joint states, and where. Needs P.V filled. */
function maxOneShotGain(P: Prepared, delta: number): { gain: number; at: number } {
  const V = P.V;
  let gain = -Infinity;
  let at = 0;
  for (let w = 0; w < P.nJ; w++) {
    const g = P.rewDev[w] + delta * V[P.succDev[w]] - V[w];
    if (g > gain) {
      gain = g;
      at = w;
    }
  }
  return { gain, at };
}

/**
 * Best response to s by policy iteration over s's states (stationary policies suffice in a
 * discounted finite MDP). Warm-starts from the previous policy in P.policy. Returns the best
 * value from s's initial state; P.policy and P.W hold the policy and its values.
 */
function bestResponse(P: Prepared, delta: number): number {
  const { n, act, next } = P.c;
  const { u, policy, pSucc, pRew, W } = P;
  const improve = 1e-3 * TOL_REL * (P.M / (1 - delta));
  for (let iter = 0; iter < 1000; iter++) {
    for (let j = 0; j < n; j++) {
      const x = policy[j];
      const y = act[j];
      // s (the opponent) sees its own y first, then the deviator's x
      pSucc[j] = next[j * 4 + y * 2 + x];
      pRew[j] = u[x * 2 + y];
    }
    pathValues(pSucc, pRew, delta, W, P.mark, P.stack, n);
    let changed = false;
    for (let j = 0; j < n; j++) {
      const y = act[j];
      const alt = 1 - policy[j];
      const q = u[alt * 2 + y] + delta * W[next[j * 4 + y * 2 + alt]];
      if (q > W[j] + improve) {
        policy[j] = alt;
        changed = true;
      }
    }
    if (!changed) break;
  }
  return W[0];
}

function tolerance(P: Prepared, delta: number): number {
  return (TOL_REL * P.M) / (1 - delta);
}

function requireDelta(delta: number): void {
  if (!(delta > 0 && delta < 1)) throw new RangeError(`δ must lie strictly between 0 and 1 (got ${delta})`);
}

function normalisedTable(game: StageGame): Float64Array {
  const errors = checkStageGame(game).errors;
  if (errors.length > 0) throw new Error(`Not a prisoner's dilemma: ${errors.map((e) => e.message).join(' ')}`);
  const d = game.R - game.P;
  return Float64Array.of(1, (game.S - game.P) / d, (game.T - game.P) / d, 0);
}

function prepared(s: Automaton, game: StageGame): { norm: Prepared; orig: Prepared } {
  const c = compileAutomaton(s);
  return { norm: prepare(c, normalisedTable(game)), orig: prepare(c, payoffTable(game)) };
}

export interface NashCheck {
  holds: boolean;
  /** best response value − V(s vs s), in the design's payoffs (≥ 0 up to rounding) */
  gain: number;
  bestValue: number;
  /** V(s vs s) */
  value: number;
}

/** Is (s, s) a Nash equilibrium at δ? Exact best response by policy iteration. */
export function isNash(s: Automaton, game: StageGame, delta: number): NashCheck {
  requireDelta(delta);
  const { norm, orig } = prepared(s, game);
  const gn = bestResponse(norm, delta) - conformValues(norm, delta)[0];
  orig.policy.set(norm.policy);
  const bestValue = bestResponse(orig, delta);
  const value = conformValues(orig, delta)[0];
  return { holds: gn <= tolerance(norm, delta), gain: bestValue - value, bestValue, value };
}

export interface SpeCheck {
  holds: boolean;
  /** largest one-shot gain over reachable joint states, in the design's payoffs */
  gain: number;
  /** joint state (player 1's state, player 2's state) where it occurs (0-based) */
  state: [number, number];
  /** a shortest history leading there, as profiles seen by player 1 (own, partner) */
  history: Profile[];
  deviationValue: number;
  conformValue: number;
}

function historyTo(P: Prepared, w: number): Profile[] {
  const out: Profile[] = [];
  for (let v = w; P.parent[v] >= 0; v = P.parent[v]) out.push(PROFILES[P.via[v]]);
  return out.reverse();
}

/** Is (s, s) subgame perfect at δ? One-shot deviation principle over all reachable joint states. */
export function isSPE(s: Automaton, game: StageGame, delta: number): SpeCheck {
  requireDelta(delta);
  const { norm, orig } = prepared(s, game);
  conformValues(norm, delta);
  const gn = maxOneShotGain(norm, delta);
  const V = conformValues(orig, delta);
  const at = gn.at;
  const deviationValue = orig.rewDev[at] + delta * V[orig.succDev[at]];
  return {
    holds: gn.gain <= tolerance(norm, delta),
    gain: deviationValue - V[at],
    state: [orig.ji[at], orig.jj[at]],
    history: historyTo(orig, at),
    deviationValue,
    conformValue: V[at],
  };
}

/**
 * The set {δ ∈ (0,1) : h(δ) ≤ 0} for a continuous h: sample GRID, look for positive local
 * minima that dip to ≤ 0 between samples (knife edges), then locate every sign change with
 * Brent's method to ~1e-15. Interior ends are closed (h is continuous and the conditions weak);
 * ends at 0 and 1 are open.
 */
function solveSet(h: (d: number) => number): DeltaInterval[] {
  const m = GRID.length;
  const hs = new Float64Array(m);
  for (let k = 0; k < m; k++) hs[k] = h(GRID[k]);

  const samples: { x: number; f: number }[] = [];
  for (let k = 0; k < m; k++) {
    samples.push({ x: GRID[k], f: hs[k] });
    if (k > 0 && k < m - 1 && hs[k] > 0 && hs[k] <= hs[k - 1] && hs[k] <= hs[k + 1]) {
      const best = goldenMin(h, GRID[k - 1], GRID[k + 1]);
      if (best.fx <= 0) samples.push({ x: best.x, f: best.fx });
    }
  }
  samples.sort((a, b) => a.x - b.x);
  const xs = samples.map((p) => p.x);
  const fs = samples.map((p) => p.f);

  const out: DeltaInterval[] = [];
  const n = xs.length;
  let k = 0;
  while (k < n) {
    if (fs[k] > 0) {
      k++;
      continue;
    }
    const start = k;
    while (k + 1 < n && fs[k + 1] <= 0) k++;
    const end = k;
    const lo = start === 0 ? 0 : brentRoot(h, xs[start - 1], xs[start], fs[start - 1], fs[start]);
    const hi = end === n - 1 ? 1 : brentRoot(h, xs[end], xs[end + 1], fs[end], fs[end + 1]);
    const interval: DeltaInterval = { lo, hi, loClosed: start !== 0, hiClosed: end !== n - 1 };
    if (interval.loClosed && interval.hiClosed && hi - lo < POINT_WIDTH) {
      const mid = (lo + hi) / 2;
      interval.lo = mid;
      interval.hi = mid;
    }
    out.push(interval);
    k++;
  }
  return out;
}

function nashH(P: Prepared): (d: number) => number {
  return (d) => bestResponse(P, d) - conformValues(P, d)[0] - tolerance(P, d);
}

function speH(P: Prepared): (d: number) => number {
  return (d) => {
    conformValues(P, d);
    return maxOneShotGain(P, d).gain - tolerance(P, d);
  };
}

/** δ-intervals where (s, s) is a Nash equilibrium. */
export function nashIntervals(s: Automaton, game: StageGame): DeltaInterval[] {
  return solveSet(nashH(prepare(compileAutomaton(s), normalisedTable(game))));
}

/** δ-intervals where (s, s) is subgame perfect. */
export function speIntervals(s: Automaton, game: StageGame): DeltaInterval[] {
  return solveSet(speH(prepare(compileAutomaton(s), normalisedTable(game))));
}

/** Both sets, sharing one compilation. */
export function checkStrategy(s: Automaton, game: StageGame): { nash: DeltaInterval[]; spe: DeltaInterval[] } {
  const P = prepare(compileAutomaton(s), normalisedTable(game));
  return { nash: solveSet(nashH(P)), spe: solveSet(speH(P)) };
}

/** Whether δ lies in one of the intervals. */
export function inIntervals(intervals: readonly DeltaInterval[], delta: number): boolean {
  return intervals.some((iv) => (iv.loClosed ? delta >= iv.lo : delta > iv.lo) && (iv.hiClosed ? delta <= iv.hi : delta < iv.hi));
}

/** e.g. "[0.72, 1)" or "{0.333333}" or "never". */
export function formatIntervals(intervals: readonly DeltaInterval[], digits = 6): string {
  if (intervals.length === 0) return 'never';
  const f = (x: number) => String(Number(x.toFixed(digits)));
  return intervals
    .map((iv) => (iv.lo === iv.hi ? `{${f(iv.lo)}}` : `${iv.loClosed ? '[' : '('}${f(iv.lo)}, ${f(iv.hi)}${iv.hiClosed ? ']' : ')'}`))
    .join(' ∪ ');
}

export type DeviationKind = 'none' | 'always-defect' | 'always-cooperate' | 'alternate' | 'deviate-then-conform' | 'other' | 'one-shot';

export interface Deviation {
  kind: DeviationKind;
  /** plain words, e.g. "alternating beats TFT at δ = 0.75: 134.857 > 128" */
  text: string;
  deviationValue: number;
  conformValue: number;
  gain: number;
  /** for Nash deviations: the deviator's actions, a prefix then a cycle repeated forever */
  actions?: { prefix: Action[]; cycle: Action[] };
  /** for one-shot deviations off the path: where */
  history?: Profile[];
}

const fmt3 = (x: number) => String(Number(x.toFixed(3)));
const fmtDelta = (x: number) => String(Number(x.toPrecision(6)));
const actionWord = (a: number) => (a === 0 ? 'C' : 'D');
const profileWords = (p: Profile) => `(${p[0].toUpperCase()},${p[1].toUpperCase()})`;

function roundsList(rounds: number[]): string {
  if (rounds.length === 1) return `round ${rounds[0]}`;
  return `rounds ${rounds.slice(0, -1).join(', ')} and ${rounds[rounds.length - 1]}`;
}

/** Follows the best-response policy against s and names it. */
function describePolicy(P: Prepared, name: string): { kind: DeviationKind; phrase: string; prefix: Action[]; cycle: Action[] } {
  const { n, act, next } = P.c;
  const seen = new Map<number, number>();
  const dev: number[] = [];
  const presc: number[] = [];
  let i = 0; // the state s itself would be in, given the observed play
  let j = 0; // the opponent's state
  while (!seen.has(i * n + j)) {
    seen.set(i * n + j, dev.length);
    const x = P.policy[j];
    const y = act[j];
    dev.push(x);
    presc.push(act[i]);
    i = next[i * 4 + x * 2 + y];
    j = next[j * 4 + y * 2 + x];
  }
  const c0 = seen.get(i * n + j)!;
  const prefix = dev.slice(0, c0).map(actionWord);
  const cycle = dev.slice(c0).map(actionWord);

  if (dev.every((x) => x === 1)) return { kind: 'always-defect', phrase: 'always defecting', prefix, cycle };
  if (dev.every((x) => x === 0)) return { kind: 'always-cooperate', phrase: 'always cooperating', prefix, cycle };
  const alternates = dev.every((x, t) => t === 0 || x !== dev[t - 1]) && cycle.length % 2 === 0 && dev[c0] !== dev[dev.length - 1];
  if (alternates) {
    return { kind: 'alternate', phrase: dev[0] === 1 ? 'alternating' : 'alternating, starting with C', prefix, cycle };
  }
  const off = dev.map((x, t) => (x !== presc[t] ? t : -1)).filter((t) => t >= 0);
  if (off.length > 0 && off.every((t) => t < c0)) {
    const verb = off.every((t) => dev[t] === 1) ? 'defecting' : off.every((t) => dev[t] === 0) ? 'cooperating' : 'deviating';
    return {
      kind: 'deviate-then-conform',
      phrase: `${verb} in ${roundsList(off.map((t) => t + 1))}, then following ${name}`,
      prefix,
      cycle,
    };
  }
  const cyc = cycle.length === 1 ? `${cycle[0]} forever` : `repeating ${cycle.join(', ')}`;
  return { kind: 'other', phrase: `playing ${prefix.length > 0 ? `${prefix.join(', ')}, then ` : ''}${cyc}`, prefix, cycle };
}

/**
 * The most profitable deviation from (s, s) at δ, in words and numbers: the best response from
 * the start when (s, s) is not Nash; otherwise the largest one-shot gain at a reachable state
 * when it is not subgame perfect; otherwise kind 'none'.
 */
export function breakingDeviation(s: Automaton, game: StageGame, delta: number): Deviation {
  requireDelta(delta);
  const { norm, orig } = prepared(s, game);
  const name = s.id;
  const at = `at δ = ${fmtDelta(delta)}`;

  const nashGap = bestResponse(norm, delta) - conformValues(norm, delta)[0];
  if (nashGap > tolerance(norm, delta)) {
    orig.policy.set(norm.policy);
    const best = bestResponse(orig, delta);
    const value = conformValues(orig, delta)[0];
    const d = describePolicy(orig, name);
    return {
      kind: d.kind,
      text: `${d.phrase} beats ${name} ${at}: ${fmt3(best)} > ${fmt3(value)}`,
      deviationValue: best,
      conformValue: value,
      gain: best - value,
      actions: { prefix: d.prefix, cycle: d.cycle },
    };
  }

  conformValues(norm, delta);
  const g = maxOneShotGain(norm, delta);
  const V = conformValues(orig, delta);
  const w = g.at;
  const devValue = orig.rewDev[w] + delta * V[orig.succDev[w]];
  if (g.gain > tolerance(norm, delta)) {
    const history = historyTo(orig, w);
    const own = orig.c.act[orig.ji[w]];
    const where = history.length === 0 ? 'in round 1' : `after ${history.map(profileWords).join(', ')}`;
    const verb = own === 0 ? 'defecting once instead of cooperating' : 'cooperating once instead of defecting';
    return {
      kind: 'one-shot',
      text: `${where}, ${verb} beats ${name} ${at}: ${fmt3(devValue)} > ${fmt3(V[w])} (${name} is a Nash equilibrium but not subgame perfect)`,
      deviationValue: devValue,
      conformValue: V[w],
      gain: devValue - V[w],
      history,
    };
  }
  return {
    kind: 'none',
    text: `no profitable deviation: ${name} is subgame perfect ${at}`,
    deviationValue: devValue,
    conformValue: V[w],
    gain: devValue - V[w],
  };
}
