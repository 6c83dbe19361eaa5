/**
 * A strategy league: every entry (an automaton, methods.md §3) meets every other entry and itself,
 * as in the published computer tournaments (Axelrod 1980a, 1980b; Axelrod 1984, ch. 2), in a
 * supergame that goes on after each round with probability δ and where each intended action flips
 * with probability ε.
 *
 * - Exact values: a pair's two expected totals solve one linear system over the joint states
 *   reachable from (start, start) (methods.md §4), both right-hand sides with one elimination; with
 *   ε = 0 the joint path is deterministic and a prefix plus a cycle gives the value in closed form.
 * - Scores are per round, (1 − δ)·V, so they read in stage-game points; an entry's score is its
 *   mean over all entries, itself included.
 * - A seeded simulation of the same matches shows the luck a finite tournament has.
 * - Evolution: the discrete replicator map (Taylor & Jonker 1978) over the entries, with the
 *   background fitness stated.
 */
import { type Action, type Automaton, profileOf } from './automata';
import { type AutomatonIssue, compileAutomaton, type CompiledAutomaton, MAX_STATES, validateAutomaton } from './automaton-check';
import { oneMinusPow, solveInPlace } from './numeric';
import { mulberry32, substreamSeed } from './prng';
import { defaultBackground, replicatorStep } from './replicator';
import { payoffTable, type StageGame } from './stage-game';

/**
 * Most states an entry may have. The strategy checker allows 12 (MAX_STATES); a league solves
 * 20,000 pairs, and with execution error each pair's system has up to (states)² unknowns, so
 * entries are kept to 6 (every library strategy has at most 4): a 200-entry league of 6-state
 * entries solves within the 5-second target (npm run bench:league).
 */
export const LEAGUE_MAX_STATES = 6;

/** What is wrong with a league entry (an empty list: nothing): the strategy checks plus the league's cap. */
export function leagueEntryIssues(a: Automaton): AutomatonIssue[] {
  const issues = validateAutomaton(a);
  const n = Array.isArray(a.states) ? a.states.length : 0;
  if (n > LEAGUE_MAX_STATES && n <= MAX_STATES) {
    issues.push({ path: 'states', message: `A league entry may have at most ${LEAGUE_MAX_STATES} states (this one has ${n}).` });
  }
  return issues;
}

export interface LeagueSettings {
  game: StageGame;
  /** continuation probability, 0 < δ < 1 */
  delta: number;
  /** execution error: each intended action flips with this probability (also in round 1) */
  epsilon: number;
}

function checkSettings({ delta, epsilon }: LeagueSettings): void {
  if (!(delta > 0 && delta < 1)) throw new RangeError(`δ must lie strictly between 0 and 1 (got ${delta})`);
  if (!(epsilon >= 0 && epsilon <= 0.5)) throw new RangeError(`ε must lie in [0, 0.5] (got ${epsilon})`);
}

/** Stage payoffs of the row player by profile code own*2 + partner (C = 0, D = 1). */
type Payoffs = Float64Array;

/**
 * Expected totals V (Σ_t δ^(t−1) u_t) of a's player and of b's player when a meets b. The two are
 * one chain seen from both sides, so one walk (ε = 0) or one elimination (ε > 0) gives both.
 */
export function pairTotals(a: CompiledAutomaton, b: CompiledAutomaton, u: Payoffs, delta: number, epsilon: number): [number, number] {
  return epsilon === 0 ? deterministicTotals(a, b, u, delta) : noisyTotals(a, b, u, delta, epsilon);
}

function deterministicTotals(a: CompiledAutomaton, b: CompiledAutomaton, u: Payoffs, delta: number): [number, number] {
  const seen = new Map<number, number>();
  const payA: number[] = [];
  const payB: number[] = [];
  let i = 0;
  let j = 0;
  while (!seen.has(i * b.n + j)) {
    seen.set(i * b.n + j, payA.length);
    const x = a.act[i];
    const y = b.act[j];
    payA.push(u[x * 2 + y]);
    payB.push(u[y * 2 + x]);
    const ni = a.next[i * 4 + x * 2 + y];
    j = b.next[j * 4 + y * 2 + x];
    i = ni;
  }
  const start = seen.get(i * b.n + j)!;
  const value = (pay: number[]) => {
    // Σ_{t<start} δ^t u_t + δ^start Σ_{t=start}^{L−1} δ^(t−start) u_t / (1 − δ^(L−start))
    let prefix = 0;
    let d = 1;
    for (let t = 0; t < start; t++, d *= delta) prefix += d * pay[t];
    let cycle = 0;
    let e = 1;
    for (let t = start; t < pay.length; t++, e *= delta) cycle += e * pay[t];
    return prefix + (d * cycle) / oneMinusPow(delta, pay.length - start);
  };
  return [value(payA), value(payB)];
}

function noisyTotals(a: CompiledAutomaton, b: CompiledAutomaton, u: Payoffs, delta: number, epsilon: number): [number, number] {
  // Joint states reachable from (0, 0): with ε > 0 every profile can occur, so the states are those
  // the two transition graphs reach together.
  const index = new Int32Array(a.n * b.n).fill(-1);
  const states: number[] = [0];
  index[0] = 0;
  for (let w = 0; w < states.length; w++) {
    const i = Math.floor(states[w] / b.n);
    const j = states[w] % b.n;
    for (let x = 0; x < 2; x++)
      for (let y = 0; y < 2; y++) {
        const k = a.next[i * 4 + x * 2 + y] * b.n + b.next[j * 4 + y * 2 + x];
        if (index[k] < 0) {
          index[k] = states.length;
          states.push(k);
        }
      }
  }
  const n = states.length;
  const m = new Float64Array(n * n);
  const ra = new Float64Array(n);
  const rb = new Float64Array(n);
  for (let w = 0; w < n; w++) {
    const i = Math.floor(states[w] / b.n);
    const j = states[w] % b.n;
    m[w * n + w] += 1;
    for (let x = 0; x < 2; x++) {
      const px = x === a.act[i] ? 1 - epsilon : epsilon;
      for (let y = 0; y < 2; y++) {
        const p = px * (y === b.act[j] ? 1 - epsilon : epsilon);
        if (p === 0) continue;
        ra[w] += p * u[x * 2 + y];
        rb[w] += p * u[y * 2 + x];
        const to = index[a.next[i * 4 + x * 2 + y] * b.n + b.next[j * 4 + y * 2 + x]];
        m[w * n + to] -= delta * p;
      }
    }
  }
  const [va, vb] = solveInPlace(m, n, [ra, rb]);
  return [va[0], vb[0]];
}

/**
 * The round-robin's exact per-round values: perRound[i][j] = (1 − δ)·V of entry i against entry j
 * (the diagonal is each entry against a copy of itself).
 */
export function roundRobin(entries: readonly Automaton[], settings: LeagueSettings): number[][] {
  checkSettings(settings);
  const compiled = entries.map(compileAutomaton);
  const u = payoffTable(settings.game);
  const n = compiled.length;
  const out = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const scale = 1 - settings.delta;
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const [vi, vj] = pairTotals(compiled[i], compiled[j], u, settings.delta, settings.epsilon);
      out[i][j] = scale * vi;
      out[j][i] = scale * vj;
    }
  }
  return out;
}

export interface Standing {
  /** the entry's index in the list given */
  entry: number;
  /** mean per-round payoff over all entries, itself included */
  score: number;
  /** 1 = best; equal scores share a rank and the next rank is skipped ("1, 2, 2, 4") */
  rank: number;
}

/** Two scores within this relative distance count as a tie (they differ by rounding only). */
const TIE = 1e-9;

/** Standings from a round-robin matrix, best first; ties keep the entries' given order. */
export function standings(perRound: readonly (readonly number[])[]): Standing[] {
  const n = perRound.length;
  const rows = perRound.map((row, entry) => ({ entry, score: row.reduce((s, v) => s + v, 0) / n, rank: 0 }));
  rows.sort((p, q) => q.score - p.score || p.entry - q.entry);
  rows.forEach((r, k) => {
    const prev = rows[k - 1];
    r.rank = prev && Math.abs(prev.score - r.score) <= TIE * Math.max(1, Math.abs(r.score)) ? prev.rank : k + 1;
  });
  return rows;
}

export interface MatchResult {
  /** undiscounted totals: Σ over the rounds played of each player's stage payoff */
  a: number;
  b: number;
  rounds: number;
}

/**
 * One supergame as it would be played: after every round another follows with probability δ;
 * each intended action flips with probability ε. E[total] = V, the exact expected total.
 */
export function simulateMatch(
  a: CompiledAutomaton,
  b: CompiledAutomaton,
  u: Payoffs,
  delta: number,
  epsilon: number,
  random: () => number,
): MatchResult {
  let i = 0;
  let j = 0;
  let ta = 0;
  let tb = 0;
  let rounds = 0;
  for (;;) {
    const x = epsilon > 0 && random() < epsilon ? 1 - a.act[i] : a.act[i];
    const y = epsilon > 0 && random() < epsilon ? 1 - b.act[j] : b.act[j];
    ta += u[x * 2 + y];
    tb += u[y * 2 + x];
    rounds++;
    const ni = a.next[i * 4 + x * 2 + y];
    j = b.next[j * 4 + y * 2 + x];
    i = ni;
    if (random() >= delta) return { a: ta, b: tb, rounds };
  }
}

export interface SimulatedRoundRobin {
  /** mean per-round value estimate (1 − δ)·mean total of i against j */
  perRound: number[][];
  /** its standard error, (1 − δ)·sd(total)/√matches */
  standardError: number[][];
  matches: number;
  seed: number;
}

/**
 * The round-robin played out: `matches` supergames per pair, seeded. Pair (i, j), i ≤ j, draws from
 * its own substream, so a result does not depend on the order pairs are computed in.
 */
export function simulatedRoundRobin(
  entries: readonly Automaton[],
  settings: LeagueSettings,
  opts: { matches: number; seed: number },
): SimulatedRoundRobin {
  checkSettings(settings);
  if (!(Number.isInteger(opts.matches) && opts.matches >= 2)) throw new RangeError('at least 2 matches per pair are needed');
  const compiled = entries.map(compileAutomaton);
  const u = payoffTable(settings.game);
  const n = compiled.length;
  const perRound = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const standardError = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const scale = 1 - settings.delta;
  const K = opts.matches;
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const random = mulberry32(substreamSeed(opts.seed, i * n + j));
      let sa = 0;
      let sb = 0;
      let qa = 0;
      let qb = 0;
      for (let k = 0; k < K; k++) {
        const r = simulateMatch(compiled[i], compiled[j], u, settings.delta, settings.epsilon, random);
        sa += r.a;
        sb += r.b;
        qa += r.a * r.a;
        qb += r.b * r.b;
      }
      const se = (sum: number, sq: number) => scale * Math.sqrt(Math.max(0, (sq - (sum * sum) / K) / (K - 1)) / K);
      perRound[i][j] = (scale * sa) / K;
      perRound[j][i] = (scale * sb) / K;
      standardError[i][j] = se(sa, qa);
      standardError[j][i] = se(sb, qb);
    }
  }
  return { perRound, standardError, matches: K, seed: opts.seed };
}

export interface Evolution {
  /** shares[g][k]: share of entry k in generation g; generation 0 is the start */
  shares: number[][];
  /** the background fitness c of x' = x (c + f)/(c + f̄) */
  background: number;
}

/**
 * Discrete replicator dynamics over the entries (methods.md §6) for `generations` steps from `start`
 * (default: equal shares). Fitness is the per-round payoff against the population. The background
 * fitness defaults to 0 when every payoff is positive, else to 1 − the smallest payoff.
 */
export function evolve(
  perRound: readonly (readonly number[])[],
  generations: number,
  opts: { start?: readonly number[]; background?: number } = {},
): Evolution {
  const n = perRound.length;
  const start = opts.start ?? new Array<number>(n).fill(1 / n);
  if (start.length !== n) throw new RangeError(`the starting shares need one value per entry (${n})`);
  const total = start.reduce((s, x) => s + x, 0);
  if (!(total > 0) || start.some((x) => !(x >= 0))) throw new RangeError('starting shares must be non-negative and not all zero');
  const background = opts.background ?? defaultBackground(perRound);
  const shares = [start.map((x) => x / total)];
  for (let g = 1; g <= generations; g++) shares.push(replicatorStep(perRound, shares[g - 1], background));
  return { shares, background };
}

/** Entries whose share in the last generation is at least `threshold`, largest share first. */
export function survivors(evolution: Evolution, threshold = 1e-3): { entry: number; share: number }[] {
  const last = evolution.shares[evolution.shares.length - 1];
  return last
    .map((share, entry) => ({ entry, share }))
    .filter((s) => s.share >= threshold)
    .sort((p, q) => q.share - p.share || p.entry - q.entry);
}

export interface PreviewPlay {
  /** the entry's moves, round by round */
  own: Action[];
  /** the opponent's moves */
  partner: Action[];
  /** the entry's per-round value against this opponent at the league's δ, exactly (ε = 0) */
  perRound: number;
}

/**
 * The first `rounds` moves of `a` against `b` without errors, as the entry editor's live preview
 * shows them, and the exact per-round value of the whole supergame at δ (no execution error).
 */
export function previewPlay(a: Automaton, b: Automaton, game: StageGame, delta: number, rounds = 8): PreviewPlay {
  const own: Action[] = [];
  const partner: Action[] = [];
  let i = 0;
  let j = 0;
  for (let t = 0; t < rounds; t++) {
    const x = a.states[i].action;
    const y = b.states[j].action;
    own.push(x);
    partner.push(y);
    i = a.states[i].next[profileOf(x, y)];
    j = b.states[j].next[profileOf(y, x)];
  }
  const [va] = pairTotals(compileAutomaton(a), compileAutomaton(b), payoffTable(game), delta, 0);
  return { own, partner, perRound: (1 - delta) * va };
}

/** A class's estimated strategy mix (strategy-frequency estimation on a session). */
export interface ClassMix {
  /** library strategy ids, in the estimate's order */
  strategies: readonly string[];
  /** estimated shares φ, summing to 1 */
  shares: readonly number[];
  /** the estimate's error probability 1 − β, used as execution error ε */
  errorProbability: number;
}

export interface ClassComparison {
  /** per-round values among the estimated strategies, with ε = the estimate's error probability */
  perRound: number[][];
  /** each estimated strategy's per-round payoff against the estimated mix, f = A φ */
  earnings: number[];
  /** the mix's mean payoff, f̄ = φ·A φ */
  mean: number;
  /** replicator dynamics started from the class's own mix */
  evolution: Evolution;
  /** each league entry's per-round payoff against the class's mix (same ε) */
  entriesAgainstMix: number[];
}

/**
 * The class beside the league: what the strategies the class was estimated to use earn against
 * each other and against the class's mix, how that mix evolves, and how each league entry would
 * have fared in that population. The estimate's tremble plays the part of execution error.
 */
export function classComparison(
  mix: ClassMix,
  entries: readonly Automaton[],
  game: StageGame,
  delta: number,
  generations: number,
  strategyOf: (id: string) => Automaton,
): ClassComparison {
  if (mix.shares.length !== mix.strategies.length) throw new RangeError('one share per estimated strategy is needed');
  // Estimates are stored rounded: shares summing to 0.9999 are read as the mix they describe.
  const total = mix.shares.reduce((s, x) => s + x, 0);
  if (!(total > 0) || mix.shares.some((x) => !(x >= 0))) throw new RangeError('shares must be non-negative and not all zero');
  const shares = mix.shares.map((x) => x / total);
  const settings = { game, delta, epsilon: mix.errorProbability };
  checkSettings(settings);
  const estimated = mix.strategies.map(strategyOf);
  const perRound = roundRobin(estimated, settings);
  const earnings = perRound.map((row) => row.reduce((s, v, k) => s + v * shares[k], 0));
  const mean = earnings.reduce((s, f, j) => s + f * shares[j], 0);
  const evolution = evolve(perRound, generations, { start: shares });
  const u = payoffTable(game);
  const compiledEstimated = estimated.map(compileAutomaton);
  const entriesAgainstMix = entries.map((e) => {
    const c = compileAutomaton(e);
    return compiledEstimated.reduce((s, b, k) => s + shares[k] * (1 - delta) * pairTotals(c, b, u, delta, mix.errorProbability)[0], 0);
  });
  return { perRound, earnings, mean, evolution, entriesAgainstMix };
}
