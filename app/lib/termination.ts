/**
 * Random termination (methods.md §2): after each round the supergame continues with probability
 * δ, so its length L is geometric on {1, 2, …}: P(L = k) = (1−δ)δ^(k−1).
 */
import { oneMinusPow } from './numeric';

function requireDelta(delta: number): void {
  if (!(delta > 0 && delta < 1)) throw new RangeError(`δ must lie strictly between 0 and 1 (got ${delta})`);
}

/** E[L] = 1/(1−δ). Source: methods.md §2 [calc]. */
export function expectedLength(delta: number): number {
  requireDelta(delta);
  return 1 / (1 - delta);
}

/** Var L = δ/(1−δ)². Source: methods.md §2 [calc]. */
export function lengthVariance(delta: number): number {
  requireDelta(delta);
  return delta / ((1 - delta) * (1 - delta));
}

/** P(L ≥ k) = δ^(k−1) (the first k−1 draws all continue); 1 for k ≤ 1. Source: methods.md §2. */
export function pLengthAtLeast(delta: number, k: number): number {
  requireDelta(delta);
  return k <= 1 ? 1 : Math.pow(delta, k - 1);
}

/** P(L = k) = (1−δ)δ^(k−1) for integers k ≥ 1. Source: methods.md §2. */
export function pLengthExactly(delta: number, k: number): number {
  requireDelta(delta);
  if (k < 1 || !Number.isInteger(k)) return 0;
  return (1 - delta) * Math.pow(delta, k - 1);
}

/** P(L ≤ k) = 1 − δ^k. */
export function pLengthAtMost(delta: number, k: number): number {
  requireDelta(delta);
  return k < 1 ? 0 : oneMinusPow(delta, Math.floor(k));
}

/**
 * Median length: the smallest k with P(L ≤ k) = 1 − δ^k ≥ 1/2, i.e. k ≥ ln(1/2)/ln δ.
 * The logarithm gives the candidate; the power check settles exact ties (δ = 1/2 → 1).
 */
export function medianLength(delta: number): number {
  requireDelta(delta);
  let k = Math.max(1, Math.ceil(Math.log(0.5) / Math.log(delta) - 1e-9));
  while (k > 1 && 1 - Math.pow(delta, k - 1) >= 0.5) k--;
  while (1 - Math.pow(delta, k) < 0.5) k++;
  return k;
}

export interface LengthRow {
  k: number;
  /** P(L = k) */
  exactly: number;
  /** P(L ≥ k) */
  atLeast: number;
  /** P(L ≤ k) */
  atMost: number;
}

/** The length distribution for k = 1 … kMax (the tail beyond is 1 − last atMost). */
export function lengthTable(delta: number, kMax: number): LengthRow[] {
  requireDelta(delta);
  const rows: LengthRow[] = [];
  let pow = 1; // δ^(k−1)
  for (let k = 1; k <= kMax; k++) {
    rows.push({ k, exactly: (1 - delta) * pow, atLeast: pow, atMost: oneMinusPow(delta, k) });
    pow *= delta;
  }
  return rows;
}

/**
 * Total rounds of N independent supergames: mean N/(1−δ), SD √(Nδ)/(1−δ) (sum of N geometric
 * lengths). Source: methods.md §2 [calc].
 */
export function roundsForSupergames(supergames: number, delta: number): { mean: number; sd: number } {
  requireDelta(delta);
  return { mean: supergames / (1 - delta), sd: Math.sqrt(supergames * delta) / (1 - delta) };
}

export interface BlockTermination {
  /** E[rounds played] = k/(1−δ^k): whole blocks are played */
  expectedRoundsPlayed: number;
  /** E[blocks] = 1/(1−δ^k): a block ends the supergame with probability 1 − δ^k */
  expectedBlocks: number;
  /** E[paid rounds] = 1/(1−δ): rounds after the real end are not paid */
  expectedPaidRounds: number;
}

/** Block random termination. Source: Fréchette & Yuksel (2017) [mechanics mem]; methods.md §2 [calc]. */
export function blockTermination(delta: number, blockSize: number): BlockTermination {
  requireDelta(delta);
  if (!(Number.isInteger(blockSize) && blockSize >= 1)) throw new RangeError('block size must be a positive integer');
  const q = oneMinusPow(delta, blockSize);
  return { expectedRoundsPlayed: blockSize / q, expectedBlocks: 1 / q, expectedPaidRounds: 1 / (1 - delta) };
}

export interface ClassTimeInput {
  supergames: number;
  delta: number;
  secondsPerRound: number;
  /** time between supergames (re-matching, showing the end); default 0 */
  overheadSecondsPerSupergame?: number;
}

export interface ClassTimePlan {
  /** expected rounds N/(1−δ) */
  rounds: number;
  /** expected minutes: rounds × secondsPerRound + N × overhead, over 60 */
  minutes: number;
  /** SD of the minutes from the randomness of the lengths (the overhead is fixed) */
  sdMinutes: number;
  /**
   * e.g. "30 supergames at δ = 0.75 ≈ 120 rounds ≈ 30 minutes at 15 s a round"; rounds and
   * minutes are rounded half-up to whole numbers, δ printed with up to 4 decimals.
   */
  sentence: string;
}

function trimNumber(x: number, decimals: number): string {
  return String(Number(x.toFixed(decimals)));
}

/** How long N supergames take in class at the round timer's pace (methods.md §2 mean and SD). */
export function classTimePlanner(input: ClassTimeInput): ClassTimePlan {
  const { supergames, delta, secondsPerRound } = input;
  const overhead = input.overheadSecondsPerSupergame ?? 0;
  const { mean, sd } = roundsForSupergames(supergames, delta);
  const minutes = (mean * secondsPerRound + supergames * overhead) / 60;
  const sdMinutes = (sd * secondsPerRound) / 60;
  const overheadWords = overhead > 0 ? ` and ${trimNumber(overhead, 1)} s between supergames` : '';
  const sentence =
    `${supergames} supergame${supergames === 1 ? '' : 's'} at δ = ${trimNumber(delta, 4)} ≈ ` +
    `${Math.round(mean)} rounds ≈ ${Math.round(minutes)} minutes at ${trimNumber(secondsPerRound, 1)} s a round${overheadWords}`;
  return { rounds: mean, minutes, sdMinutes, sentence };
}
