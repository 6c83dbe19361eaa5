/**
 * Strategy-frequency estimation (SFEM), methods.md §5; Dal Bó & Fréchette (2011).
 *
 * Each subject i uses one strategy k of a set K for the whole window; shares φ_k are unknown;
 * each choice follows the strategy's prescription with probability β. With C_ik matches and
 * E_ik mismatches, ln L(φ, β) = Σ_i ln Σ_k φ_k β^C_ik (1−β)^E_ik, maximised by EM with the exact
 * M-step. Pure: no IO, runs in the browser and in worker threads.
 */
import { prescribedActions } from './automata';
import type { Automaton } from './automata';
import { groupPanel, selectWindow } from './panel';
import type { GroupBy, Panel, SubjectHistory, Window } from './panel';
import { mulberry32, substreamSeed } from './prng';
import type { Rng } from './prng';

/**
 * The data SFEM needs, computed once: C_ik per strategy and n_i = C_ik + E_ik per subject
 * (the same for every k), so EM iterations never touch the histories again.
 */
export interface CountsTable {
  strategies: string[];
  /** `session/subject` labels, in the order of the arrays */
  subjects: string[];
  /** n_i: choices of subject i in the window */
  choices: Int32Array;
  /** matches[k][i] = C_ik; mismatches are E_ik = n_i − C_ik */
  matches: Int32Array[];
}

/**
 * Counts matches with each strategy's prescription given the OBSERVED history (own and partner
 * actions), restarting the automaton in every supergame — the convention that reproduces
 * Dal Bó & Fréchette (2011) Table 7 (methods.md §3).
 */
export function countsTable(subjects: readonly SubjectHistory[], strategies: readonly Automaton[]): CountsTable {
  const N = subjects.length;
  const choices = new Int32Array(N);
  const matches = strategies.map(() => new Int32Array(N));
  subjects.forEach((s, i) => {
    for (const g of s.supergames) {
      choices[i] += g.own.length;
      strategies.forEach((a, k) => {
        const p = prescribedActions(a, g.own, g.partner);
        for (let t = 0; t < p.length; t++) if (p[t] === g.own[t]) matches[k][i]++;
      });
    }
  });
  return {
    strategies: strategies.map((a) => a.id),
    subjects: subjects.map((s) => `${s.session}/${s.subject}`),
    choices,
    matches,
  };
}

/** Tremble parameter γ from β = 1/(1+exp(−1/γ)) (methods.md §5), i.e. γ = −1/ln(1/β − 1). */
export function gammaOf(beta: number): number {
  // The logistic tremble needs β > 1/2: at or below it no γ > 0 exists, report "pure noise".
  if (beta <= 0.5) return Infinity;
  if (beta >= 1) return 0;
  return -1 / Math.log(1 / beta - 1);
}

/** β from the tremble parameter γ (methods.md §5). */
export function betaOf(gamma: number): number {
  return 1 / (1 + Math.exp(-1 / gamma));
}

export interface EmOptions {
  /** stop when |Δ ln L| falls below max(tol, 1e-14·|ln L|) (the second term is rounding noise) */
  tol?: number;
  maxIterations?: number;
}

export interface EmResult {
  shares: Float64Array;
  beta: number;
  logLik: number;
  iterations: number;
  converged: boolean;
}

// β is kept off 0 and 1 so that 0·ln(0) never turns into NaN; it costs < 1e-12 in ln L.
const BETA_MIN = 1e-12;
const BETA_MAX = 1 - 1e-12;

/**
 * EM from one start (methods.md §5): w_ik ∝ φ_k β^C_ik (1−β)^E_ik; φ_k = mean_i w_ik;
 * β = Σ w_ik C_ik / Σ w_ik (C_ik + E_ik). `weights` (subject multiplicities, for the bootstrap)
 * make each subject count m_i times; null means 1 each. Terms in logs (log-sum-exp): β^C underflows.
 * Since Σ_k w_ik = 1, the β denominator is Σ_i m_i n_i, a constant.
 */
export function runEm(
  table: CountsTable,
  weights: Float64Array | null,
  shares0: ArrayLike<number>,
  beta0: number,
  options: EmOptions = {},
): EmResult {
  const tol = options.tol ?? 1e-12;
  const maxIterations = options.maxIterations ?? 50_000;
  const K = table.matches.length;
  const N = table.choices.length;
  const { choices, matches } = table;
  const phi = Float64Array.from(shares0);
  let beta = Math.min(BETA_MAX, Math.max(BETA_MIN, beta0));
  const logPhi = new Float64Array(K);
  const a = new Float64Array(K);
  const sumW = new Float64Array(K);
  const c = new Int32Array(K);

  let totalWeight = 0;
  let totalChoices = 0;
  for (let i = 0; i < N; i++) {
    const m = weights ? weights[i] : 1;
    totalWeight += m;
    totalChoices += m * choices[i];
  }

  let logLik = -Infinity;
  let previous = -Infinity;
  let iterations = 0;
  let converged = false;
  for (; iterations <= maxIterations; iterations++) {
    const lb = Math.log(beta);
    const l1b = Math.log1p(-beta);
    for (let k = 0; k < K; k++) logPhi[k] = Math.log(phi[k]);
    sumW.fill(0);
    let num = 0;
    logLik = 0;
    for (let i = 0; i < N; i++) {
      const m = weights ? weights[i] : 1;
      if (m === 0) continue;
      const n = choices[i];
      let max = -Infinity;
      for (let k = 0; k < K; k++) {
        const ck = matches[k][i];
        c[k] = ck;
        const v = logPhi[k] + ck * lb + (n - ck) * l1b;
        a[k] = v;
        if (v > max) max = v;
      }
      let s = 0;
      for (let k = 0; k < K; k++) {
        const e = Math.exp(a[k] - max);
        a[k] = e;
        s += e;
      }
      logLik += m * (max + Math.log(s));
      const scale = m / s;
      for (let k = 0; k < K; k++) {
        const w = a[k] * scale;
        sumW[k] += w;
        num += w * c[k];
      }
    }
    // logLik belongs to the current (φ, β): stop before moving so the pair stays consistent.
    if (Math.abs(logLik - previous) < Math.max(tol, 1e-14 * Math.abs(logLik))) {
      converged = true;
      break;
    }
    if (iterations === maxIterations) break;
    previous = logLik;
    for (let k = 0; k < K; k++) phi[k] = sumW[k] / totalWeight;
    beta = Math.min(BETA_MAX, Math.max(BETA_MIN, num / totalChoices));
  }
  return { shares: phi, beta, logLik, iterations, converged };
}

/** Posterior strategy probabilities w_ik of every subject at (φ, β). */
export function posteriors(table: CountsTable, shares: ArrayLike<number>, beta: number): number[][] {
  const K = table.matches.length;
  const lb = Math.log(beta);
  const l1b = Math.log1p(-beta);
  const out: number[][] = [];
  for (let i = 0; i < table.choices.length; i++) {
    const n = table.choices[i];
    const a = new Array<number>(K);
    let max = -Infinity;
    for (let k = 0; k < K; k++) {
      const ck = table.matches[k][i];
      a[k] = Math.log(shares[k]) + ck * lb + (n - ck) * l1b;
      if (a[k] > max) max = a[k];
    }
    let s = 0;
    for (let k = 0; k < K; k++) s += a[k] = Math.exp(a[k] - max);
    out.push(a.map((v) => v / s));
  }
  return out;
}

/** ln L(φ, β) of methods.md §5, in log space; `weights` as in runEm. */
export function logLikelihood(table: CountsTable, shares: ArrayLike<number>, beta: number, weights: Float64Array | null = null): number {
  const K = table.matches.length;
  const lb = Math.log(beta);
  const l1b = Math.log1p(-beta);
  let ll = 0;
  for (let i = 0; i < table.choices.length; i++) {
    const m = weights ? weights[i] : 1;
    if (m === 0) continue;
    const n = table.choices[i];
    let max = -Infinity;
    const a = new Array<number>(K);
    for (let k = 0; k < K; k++) {
      const ck = table.matches[k][i];
      a[k] = Math.log(shares[k]) + ck * lb + (n - ck) * l1b;
      if (a[k] > max) max = a[k];
    }
    let s = 0;
    for (let k = 0; k < K; k++) s += Math.exp(a[k] - max);
    ll += m * (max + Math.log(s));
  }
  return ll;
}

/** A start on the simplex: Dirichlet(1, …, 1) shares (normalised Exp(1) draws) and β in [0.6, 0.95). */
function randomStart(K: number, rng: Rng): { shares: Float64Array; beta: number } {
  const shares = new Float64Array(K);
  let s = 0;
  for (let k = 0; k < K; k++) s += shares[k] = -Math.log(1 - rng());
  for (let k = 0; k < K; k++) shares[k] /= s;
  return { shares, beta: 0.6 + 0.35 * rng() };
}

export interface EstimateOptions extends EmOptions {
  /** EM starts: the uniform one plus starts−1 seeded random ones (default 6) */
  starts?: number;
  /** seed of the random starts (default 1) */
  seed?: number;
}

export interface SfemEstimate {
  strategies: string[];
  /** φ_k, the estimated share of subjects using strategy k */
  shares: number[];
  /** β: probability that a choice follows the subject's strategy */
  beta: number;
  /** 1 − β: probability that a choice deviates from it (some software calls THIS "gamma") */
  errorProbability: number;
  /** γ: the tremble parameter of β = 1/(1+exp(−1/γ)) (Dal Bó & Fréchette 2011) */
  gamma: number;
  logLik: number;
  subjects: number;
  choices: number;
  /** K − 1 free shares + β */
  parameters: number;
  /** −2 ln L + 2p */
  aic: number;
  /** −2 ln L + p ln(number of subjects): subjects are the independent units of the sampling */
  bic: number;
  /** subject labels (as in the counts table) and their posterior strategy probabilities */
  posteriors: { subject: string; probabilities: number[] }[];
  iterations: number;
  converged: boolean;
}

/**
 * Maximum-likelihood SFEM with several EM starts; keeps the best ln L (an earlier start wins
 * ties within 1e-9, so observationally equivalent strategies split the same way on every run).
 */
export function estimate(table: CountsTable, options: EstimateOptions = {}): SfemEstimate {
  const K = table.strategies.length;
  const N = table.choices.length;
  if (K === 0) throw new Error('SFEM needs at least one strategy');
  if (N === 0) throw new Error('SFEM needs at least one subject with choices in the window');
  const starts = Math.max(1, options.starts ?? 6);
  const rng = mulberry32(options.seed ?? 1);
  let best: EmResult | null = null;
  for (let s = 0; s < starts; s++) {
    const start = s === 0 ? { shares: new Float64Array(K).fill(1 / K), beta: 0.8 } : randomStart(K, rng);
    const r = runEm(table, null, start.shares, start.beta, options);
    if (!best || r.logLik > best.logLik + 1e-9) best = r;
  }
  return summarise(table, best!);
}

function summarise(table: CountsTable, r: EmResult): SfemEstimate {
  const K = table.strategies.length;
  const N = table.choices.length;
  let choices = 0;
  for (let i = 0; i < N; i++) choices += table.choices[i];
  const post = posteriors(table, r.shares, r.beta);
  return {
    strategies: table.strategies.slice(),
    shares: Array.from(r.shares),
    beta: r.beta,
    errorProbability: 1 - r.beta,
    gamma: gammaOf(r.beta),
    logLik: r.logLik,
    subjects: N,
    choices,
    parameters: K,
    aic: -2 * r.logLik + 2 * K,
    bic: -2 * r.logLik + K * Math.log(N),
    posteriors: table.subjects.map((subject, i) => ({ subject, probabilities: post[i] })),
    iterations: r.iterations,
    converged: r.converged,
  };
}

/**
 * Subjects by strategy from their posteriors: `assigned[k]` counts subjects whose highest posterior
 * is strategy k (a tie within 1e-12 goes to the earlier strategy), `expected[k]` = Σ_i P(k | i),
 * the expected number of subjects using k.
 */
export function posteriorCounts(
  posteriors: readonly { probabilities: readonly number[] }[],
  K: number,
): { assigned: number[]; expected: number[] } {
  const assigned = new Array<number>(K).fill(0);
  const expected = new Array<number>(K).fill(0);
  for (const p of posteriors) {
    let best = 0;
    p.probabilities.forEach((v, k) => {
      expected[k] += v;
      if (v > p.probabilities[best] + 1e-12) best = k;
    });
    assigned[best]++;
  }
  return { assigned, expected };
}

// ---------------------------------------------------------------------------------------------
// Bootstrap over subjects (methods.md §5: resample subjects with replacement within the group,
// seeded; report seed and B). Replicate r draws from its own substream of the seed, so any split
// of 0..B−1 into chunks (or over worker threads) gives the same replicates.

export interface Replicate {
  shares: number[];
  beta: number;
  logLik: number;
}

export interface ReplicateOptions extends EmOptions {
  /** weight of the point estimate in the warm start; the rest is uniform so shares at 0 can revive */
  warmWeight?: number;
}

/** Replicates from..to−1 (0-based) of a bootstrap with `seed`, warm-started at `point`. */
export function estimateReplicates(
  table: CountsTable,
  point: { shares: ArrayLike<number>; beta: number },
  seed: number,
  from: number,
  to: number,
  options: ReplicateOptions = {},
): Replicate[] {
  const K = table.strategies.length;
  const N = table.choices.length;
  const warm = options.warmWeight ?? 0.9;
  const start = Float64Array.from({ length: K }, (_, k) => warm * point.shares[k] + (1 - warm) / K);
  const weights = new Float64Array(N);
  const out: Replicate[] = [];
  for (let r = from; r < to; r++) {
    const rng = mulberry32(substreamSeed(seed, r));
    weights.fill(0);
    for (let j = 0; j < N; j++) weights[Math.floor(rng() * N)]++;
    const e = runEm(table, weights, start, point.beta, options);
    out.push({ shares: Array.from(e.shares), beta: e.beta, logLik: e.logLik });
  }
  return out;
}

export interface BootstrapSummary {
  B: number;
  seed: number;
  /** standard deviation over replicates (n − 1 divisor) of each share, in strategy order */
  sdShares: number[];
  sdBeta: number;
  sdGamma: number;
}

const sd = (xs: number[]): number => {
  const n = xs.length;
  if (n < 2) return NaN;
  const mean = xs.reduce((s, x) => s + x, 0) / n;
  return Math.sqrt(xs.reduce((s, x) => s + (x - mean) ** 2, 0) / (n - 1));
};

export function summariseReplicates(replicates: readonly Replicate[], seed: number): BootstrapSummary {
  const K = replicates[0]?.shares.length ?? 0;
  return {
    B: replicates.length,
    seed,
    sdShares: Array.from({ length: K }, (_, k) => sd(replicates.map((r) => r.shares[k]))),
    sdBeta: sd(replicates.map((r) => r.beta)),
    sdGamma: sd(replicates.map((r) => gammaOf(r.beta))),
  };
}

/** The whole bootstrap in this thread (see sfem-workers.server.ts for worker threads). */
export function bootstrap(
  table: CountsTable,
  point: { shares: ArrayLike<number>; beta: number },
  B: number,
  seed: number,
  options: ReplicateOptions = {},
): BootstrapSummary {
  return summariseReplicates(estimateReplicates(table, point, seed, 0, B, options), seed);
}

// ---------------------------------------------------------------------------------------------

export interface GroupEstimate {
  group: string;
  table: CountsTable;
  estimate: SfemEstimate;
}

/**
 * The estimation the CLI and the Debrief run: window first (methods.md §5: late supergames),
 * then one SFEM per group (per treatment in the literature).
 */
export function estimateGroups(
  panel: Panel,
  options: { by: GroupBy; window: Window; strategies: readonly Automaton[] } & EstimateOptions,
): GroupEstimate[] {
  const windowed = selectWindow(panel, options.window);
  return groupPanel(windowed, options.by)
    .filter((g) => g.panel.subjects.length > 0)
    .map(({ group, panel: p }) => {
      const table = countsTable(p.subjects, options.strategies);
      return { group, table, estimate: estimate(table, options) };
    });
}
