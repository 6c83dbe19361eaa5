/**
 * Goodness of fit of realised supergame lengths against the geometric law of random termination
 * (methods.md §2): P(L = k) = (1−δ)δ^(k−1), P(L ≥ k) = δ^(k−1). One length per session-supergame
 * (all pairs of a session share the draw). Pearson's χ² with δ known. Pure.
 */
import { randomInt, rngFor } from './rng';

/** ln Γ(x) for x > 0, Lanczos approximation (g = 7, n = 9; Numerical Recipes §6.1 style). */
function logGamma(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905,
    -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let s = c[0];
  for (let i = 1; i < 9; i++) s += c[i] / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(s);
}

/**
 * Regularised incomplete gamma functions P(a, x) and Q(a, x) = 1 − P(a, x): the series for
 * x < a + 1, the continued fraction (modified Lentz) otherwise, each where it converges fast
 * (Numerical Recipes §6.2). Q is computed directly so small upper tails keep their digits.
 */
export function regularizedGamma(a: number, x: number): { p: number; q: number } {
  if (!(a > 0) || !(x >= 0)) throw new Error(`incomplete gamma needs a > 0 and x ≥ 0 (got ${a}, ${x})`);
  if (x === 0) return { p: 0, q: 1 };
  const logPrefix = a * Math.log(x) - x - logGamma(a);
  const EPS = 1e-16;
  if (x < a + 1) {
    let ap = a;
    let term = 1 / a;
    let sum = term;
    for (let n = 0; n < 10_000; n++) {
      ap += 1;
      term *= x / ap;
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * EPS) break;
    }
    const p = Math.min(1, sum * Math.exp(logPrefix));
    return { p, q: 1 - p };
  }
  const TINY = 1e-300;
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 10_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  const q = Math.min(1, Math.exp(logPrefix) * h);
  return { p: 1 - q, q };
}

/** CDF of the χ² distribution with `df` degrees of freedom: P(df/2, x/2). */
export function chiSquareCdf(x: number, df: number): number {
  if (x <= 0) return 0;
  return regularizedGamma(df / 2, x / 2).p;
}

/** Upper tail P(χ²_df ≥ x), the p-value of a χ² test. */
export function chiSquareSurvival(x: number, df: number): number {
  if (x <= 0) return 1;
  return regularizedGamma(df / 2, x / 2).q;
}

export interface GofBin {
  /** first length in the bin */
  from: number;
  /** last length in the bin; null for the pooled tail "from+" */
  to: number | null;
  observed: number;
  expected: number;
}

export interface GofResult {
  /** number of session-supergames */
  n: number;
  delta: number;
  bins: GofBin[];
  /** Pearson's χ² = Σ (O − E)² / E */
  statistic: number;
  /** bins − 1: δ is known, no degree of freedom is lost (methods.md §2) */
  df: number;
  pValue: number;
  /**
   * 'chi-square': p from the χ² distribution (every bin expects ≥ 5);
   * 'simulated': too few supergames for that, so p is the share of `replicates` seeded samples of
   * n geometric lengths whose statistic (same bins) is at least the observed one, (1 + #≥)/(1 + B)
   * (a Monte Carlo test; Davison & Hinkley 1997, ch. 4 [recalled from memory]).
   */
  method: 'chi-square' | 'simulated';
  /** for 'simulated': B and the seed of the samples */
  replicates: number | null;
  /** m of the tail bin "m+" */
  tailFrom: number;
}

/** Samples drawn for a small-sample p-value: its Monte Carlo standard error is at most 0.005. */
export const SIMULATED_REPLICATES = 9999;

/**
 * Pearson χ² of realised lengths against the geometric law with δ known (methods.md §2).
 * Bins 1, …, m−1 and the pooled tail m+. The tail is pooled from the top: every length whose own
 * expected count n(1−δ)δ^(k−1) is below `minExpected` (5, common practice) goes into the tail, together
 * with the longest length that still reaches it, so m is the largest k with n(1−δ)δ^(k−1) ≥ 5 and
 * every bin's expected count is ≥ 5. This is the rule behind methods.md §2's check values (bins
 * 1…9, 10+ for the δ = 3/4 sessions of dbf2011, 1…5, 6+ for δ = 1/2); `tailFrom` overrides it.
 *
 * Too few supergames for two such bins (e.g. 25 at δ = 0.9): the same statistic with bins that
 * expect at least 1, and a simulated p-value instead of the χ² distribution's.
 */
export function geometricLengthGof(
  lengths: readonly number[],
  delta: number,
  options: { minExpected?: number; tailFrom?: number; seed?: number; replicates?: number } = {},
): GofResult {
  if (!(delta > 0 && delta < 1)) throw new Error(`δ must lie in (0, 1) (got ${delta})`);
  for (const L of lengths) if (!Number.isInteger(L) || L < 1) throw new Error(`supergame lengths must be integers ≥ 1 (got ${L})`);
  const n = lengths.length;
  if (n === 0) throw new Error('no supergame lengths to test');
  const minExpected = options.minExpected ?? 5;
  // Source: methods.md §2, P(L = k) = (1−δ)δ^(k−1), P(L ≥ k) = δ^(k−1).
  const pointExpected = (k: number) => n * (1 - delta) * delta ** (k - 1);
  const tailFor = (least: number) => {
    let m = 1;
    while (pointExpected(m + 1) >= least) m++;
    return m;
  };
  let m = options.tailFrom ?? tailFor(minExpected);
  let method: GofResult['method'] = 'chi-square';
  if (options.tailFrom === undefined && m < 2) {
    method = 'simulated';
    m = Math.max(2, tailFor(1));
  }
  if (!Number.isInteger(m) || m < 2) throw new Error(`tailFrom must be an integer ≥ 2 (got ${m})`);

  const expected = Array.from({ length: m }, (_, i) => (i + 1 < m ? pointExpected(i + 1) : n * delta ** (m - 1)));
  const observedIn = (ls: ArrayLike<number>) => {
    const counts = new Array<number>(m).fill(0);
    for (let i = 0; i < ls.length; i++) counts[Math.min(ls[i], m) - 1]++;
    return counts;
  };
  const pearson = (counts: readonly number[]) => counts.reduce((s, o, i) => s + (o - expected[i]) ** 2 / expected[i], 0);
  const observed = observedIn(lengths);
  const bins: GofBin[] = observed.map((o, i) => ({ from: i + 1, to: i + 1 < m ? i + 1 : null, observed: o, expected: expected[i] }));
  const statistic = pearson(observed);
  const df = bins.length - 1;
  if (method === 'chi-square')
    return { n, delta, bins, statistic, df, pValue: chiSquareSurvival(statistic, df), method, replicates: null, tailFrom: m };

  const B = options.replicates ?? SIMULATED_REPLICATES;
  const rng = rngFor(options.seed ?? 0, 'gof', 0);
  // Geometric lengths by inversion: L = 1 + ⌊ln U / ln δ⌋, U uniform on (0, 1] in steps of 2^−31.
  const SCALE = 2 ** 31;
  const logDelta = Math.log(delta);
  const sample = new Int32Array(n);
  let atLeast = 0;
  for (let b = 0; b < B; b++) {
    for (let i = 0; i < n; i++) sample[i] = 1 + Math.floor(Math.log(randomInt(rng, 1, SCALE) / SCALE) / logDelta);
    // a tiny tolerance: the observed statistic and an equal simulated one may differ in the last bit
    if (pearson(observedIn(sample)) >= statistic - 1e-9) atLeast++;
  }
  return { n, delta, bins, statistic, df, pValue: (1 + atLeast) / (1 + B), method, replicates: B, tailFrom: m };
}
