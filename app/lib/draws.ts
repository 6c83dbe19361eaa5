/**
 * The random-termination draws of a session (methods.md §2).
 *
 * After each round an integer 1–100 is drawn; the supergame continues while draw ≤ 100·δ, so its
 * length L (the index of the first draw above 100·δ) is geometric. One sequence per session, common
 * to all pairs, generated from the session seed: a typed seed reproduces another session's draws.
 * Each supergame has its own random stream, so the numbers of supergame s do not depend on δ, on
 * the termination scheme or on the other supergames (same seed, different δ ⇒ coupled lengths).
 */
import { normaliseSeed, randomInt, rngFor, type Seed } from './rng';

export type Termination = { kind: 'standard' } | { kind: 'block'; k: number };

export interface SupergameDraws {
  supergame: number;
  /** one draw per round played; under block termination also for the rounds after the end */
  draws: number[];
  /** L: rounds that count (are paid) — index of the first draw above the cut-off */
  length: number;
  /** rounds actually played: L, or L rounded up to a whole block (Fréchette & Yuksel 2017) */
  roundsPlayed: number;
}

export interface DrawSequence {
  seed: number;
  delta: number;
  cutoff: number;
  termination: Termination;
  supergames: SupergameDraws[];
}

/**
 * δ in millionths, as an integer. 100·δ is compared with integer draws, so the comparison must not
 * suffer from binary fractions (100 × 0.29 = 28.999…96 in floating point, yet draw 29 continues).
 * Capped below 1 so that a draw of 100 always ends a supergame.
 */
function deltaMillionths(delta: number): number {
  if (!(delta > 0 && delta < 1)) throw new RangeError(`δ must lie in (0, 1), got ${delta}`);
  return Math.min(Math.max(Math.round(delta * 1e6), 0), 999_999);
}

/** The largest draw that continues the supergame: ⌊100·δ⌋ (draws are integers). */
export function cutoffOf(delta: number): number {
  return Math.floor(deltaMillionths(delta) / 10_000);
}

/**
 * The continuation probability the 1–100 draw really implements: ⌊100·δ⌋/100. Equal to δ only when
 * 100·δ is a whole number (δ = 0.875 gives 0.87).
 */
export function realisedDelta(delta: number): number {
  return cutoffOf(delta) / 100;
}

/** 100·δ as the phone shows it: "75", "87.5" (never "87.50000001"). */
export function formatHundredDelta(delta: number): string {
  const m = deltaMillionths(delta);
  const whole = Math.floor(m / 10_000);
  const frac = m % 10_000;
  if (frac === 0) return String(whole);
  return `${whole}.${String(frac).padStart(4, '0').replace(/0+$/, '')}`;
}

function validateTermination(t: Termination): void {
  if (t.kind === 'block' && (!Number.isInteger(t.k) || t.k < 1)) {
    throw new RangeError(`Block size must be a positive integer, got ${t.k}`);
  }
}

/** Draws of one supergame (1-based). */
export function supergameDraws(
  seed: Seed,
  delta: number,
  supergame: number,
  termination: Termination = { kind: 'standard' },
): SupergameDraws {
  if (!Number.isInteger(supergame) || supergame < 1) throw new RangeError(`Bad supergame ${supergame}`);
  validateTermination(termination);
  const cutoff = cutoffOf(delta);
  const rng = rngFor(seed, 'draws', supergame);
  const draws: number[] = [];
  // Continue while draw ≤ 100·δ; the draw after the last round is the one above it. Ends with
  // probability one: cutoff ≤ 99, so each draw ends the supergame with probability ≥ 1/100.
  for (;;) {
    const d = randomInt(rng, 1, 100);
    draws.push(d);
    if (d > cutoff) break;
  }
  const length = draws.length;
  let roundsPlayed = length;
  if (termination.kind === 'block') {
    // Fréchette & Yuksel (2017): play on to the end of the block in which the supergame ended;
    // a draw is still made in each of those rounds (methods.md §2).
    roundsPlayed = Math.ceil(length / termination.k) * termination.k;
    while (draws.length < roundsPlayed) draws.push(randomInt(rng, 1, 100));
  }
  return { supergame, draws, length, roundsPlayed };
}

/** The whole sequence of a session: supergames 1..n. */
export function drawSequence(
  seed: Seed,
  delta: number,
  supergames: number,
  termination: Termination = { kind: 'standard' },
): DrawSequence {
  const out: SupergameDraws[] = [];
  for (let s = 1; s <= supergames; s++) out.push(supergameDraws(seed, delta, s, termination));
  return { seed: normaliseSeed(seed), delta, cutoff: cutoffOf(delta), termination, supergames: out };
}

/** Whether the draw continues the supergame. */
export function continues(draw: number, delta: number): boolean {
  return draw <= cutoffOf(delta);
}

/** The draw in plain words for the phone (product.md, "Play"). */
export function describeDraw(draw: number, delta: number): string {
  const c = formatHundredDelta(delta);
  return continues(draw, delta)
    ? `Draw ${draw} — another round, because it is ≤ ${c}`
    : `Draw ${draw} — this supergame ends, because it is above ${c}`;
}

/**
 * The end-of-block announcement under block termination: the block's draws, and whether (and in
 * which round) the supergame ended. `firstRound` is the block's first round; `length` is L.
 */
export function describeBlock(draws: readonly number[], firstRound: number, length: number, delta: number): string {
  const c = formatHundredDelta(delta);
  const lastRound = firstRound + draws.length - 1;
  const span = draws.length === 1 ? `round ${firstRound}` : `rounds ${firstRound}–${lastRound}`;
  const list = draws.join(', ');
  if (length >= firstRound && length <= lastRound) {
    const ending = draws[length - firstRound];
    const unpaid = lastRound - length;
    const tail =
      unpaid === 0
        ? ''
        : unpaid === 1
          ? ` Round ${lastRound} was played but is not paid.`
          : ` Rounds ${length + 1}–${lastRound} were played but are not paid.`;
    return `Draws for ${span}: ${list}. This supergame ended in round ${length}, because draw ${ending} is above ${c}.${tail}`;
  }
  return `Draws for ${span}: ${list}. All are ≤ ${c}, so this supergame goes on for another block.`;
}

export interface LengthFit {
  /** bins 1, 2, …, tailFrom−1 and a pooled tail "tailFrom+" */
  bins: { label: string; observed: number; expected: number }[];
  tailFrom: number;
  chiSquare: number;
  /** bins − 1: δ is known, no parameter is estimated (methods.md §2) */
  df: number;
}

/**
 * Pearson χ² of realised supergame lengths against the geometric law P(L=k) = (1−q)q^(k−1),
 * P(L≥k) = q^(k−1) (methods.md §2), with q the continuation probability actually implemented
 * (see realisedDelta). Without `tailFrom`, the tail is pooled as late as possible while every bin
 * keeps an expected count ≥ 5 (methods.md §2). The p-value is left to a statistics package.
 */
export function geometricLengthFit(lengths: readonly number[], q: number, tailFrom?: number): LengthFit {
  const n = lengths.length;
  if (n === 0) throw new RangeError('No lengths to fit');
  if (!(q > 0 && q < 1)) throw new RangeError(`q must lie in (0, 1), got ${q}`);
  let K = tailFrom ?? 2;
  if (tailFrom === undefined) {
    while (n * (1 - q) * q ** (K - 1) >= 5 && n * q ** K >= 5) K++;
  }
  if (!Number.isInteger(K) || K < 2) throw new RangeError(`tailFrom must be an integer ≥ 2, got ${K}`);
  const bins: LengthFit['bins'] = [];
  for (let k = 1; k < K; k++) {
    bins.push({ label: String(k), observed: 0, expected: n * (1 - q) * q ** (k - 1) });
  }
  bins.push({ label: `${K}+`, observed: 0, expected: n * q ** (K - 1) });
  for (const L of lengths) {
    if (!Number.isInteger(L) || L < 1) throw new RangeError(`Bad length ${L}`);
    bins[Math.min(L, K) - 1].observed++;
  }
  let chiSquare = 0;
  for (const b of bins) chiSquare += (b.observed - b.expected) ** 2 / b.expected;
  return { bins, tailFrom: K, chiSquare, df: bins.length - 1 };
}
