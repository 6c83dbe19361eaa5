/**
 * Goodness of fit of realised supergame lengths against the geometric law of random termination
 * (methods.md §2): P(L = k) = (1−δ)δ^(k−1), P(L ≥ k) = δ^(k−1). One length per session-supergame
 * (all pairs of a session share the draw). Pearson's χ² with δ known. Pure.
 */

/** ln Γ(x) for x > 0, Lanczos approximation (g = 7, n = 9; Numerical Recipes §6.1 style). */
function logGamma(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
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
  /** m of the tail bin "m+" */
  tailFrom: number;
}

/**
 * Pearson χ² of realised lengths against the geometric law with δ known (methods.md §2).
 * Bins 1, …, m−1 and the pooled tail m+. The tail is pooled from the top: every length whose own
 * expected count n(1−δ)δ^(k−1) is below `minExpected` (5, common practice) goes into the tail, together
 * with the longest length that still reaches it, so m is the largest k with n(1−δ)δ^(k−1) ≥ 5 and
 * every bin's expected count is ≥ 5. This is the rule behind methods.md §2's check values (bins
 * 1…9, 10+ for the δ = 3/4 sessions of dbf2011, 1…5, 6+ for δ = 1/2); `tailFrom` overrides it.
 */
export function geometricLengthGof(
  lengths: readonly number[],
  delta: number,
  options: { minExpected?: number; tailFrom?: number } = {},
): GofResult {
  if (!(delta > 0 && delta < 1)) throw new Error(`δ must lie in (0, 1) (got ${delta})`);
  for (const L of lengths)
    if (!Number.isInteger(L) || L < 1) throw new Error(`supergame lengths must be integers ≥ 1 (got ${L})`);
  const n = lengths.length;
  if (n === 0) throw new Error('no supergame lengths to test');
  const minExpected = options.minExpected ?? 5;
  // Source: methods.md §2, P(L = k) = (1−δ)δ^(k−1), P(L ≥ k) = δ^(k−1).
  const pointExpected = (k: number) => n * (1 - delta) * delta ** (k - 1);
  let m = options.tailFrom ?? 1;
  if (options.tailFrom === undefined) while (pointExpected(m + 1) >= minExpected) m++;
  if (!Number.isInteger(m) || m < 2)
    throw new Error(
      `too few supergames for a χ² test against the geometric law: need at least two bins with expected counts ≥ ${minExpected}`,
    );

  const bins: GofBin[] = [];
  for (let k = 1; k < m; k++)
    bins.push({ from: k, to: k, observed: lengths.filter((L) => L === k).length, expected: pointExpected(k) });
  bins.push({ from: m, to: null, observed: lengths.filter((L) => L >= m).length, expected: n * delta ** (m - 1) });

  const statistic = bins.reduce((s, b) => s + (b.observed - b.expected) ** 2 / b.expected, 0);
  const df = bins.length - 1;
  return { n, delta, bins, statistic, df, pValue: chiSquareSurvival(statistic, df), tailFrom: m };
}
