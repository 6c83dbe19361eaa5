/**
 * The random-termination draws of a session (methods.md §2).
 *
 * After each round an integer 1–100 is drawn; the supergame continues while draw ≤ 100·δ, so its
 * length L (the index of the first draw above 100·δ) is geometric. (When 100·δ is not whole the
 * range widens to 1–1000 or 1–10000 so that the continuation probability is exactly δ.) One sequence per session, common
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
  /** draws run from 1 to max */
  max: number;
  termination: Termination;
  supergames: SupergameDraws[];
}

/**
 * δ in millionths, as an integer, so that comparisons do not suffer from binary fractions
 * (100 × 0.29 = 28.999…96 in floating point, yet draw 29 continues).
 */
function deltaMillionths(delta: number): number {
  if (!(delta > 0 && delta < 1)) throw new RangeError(`δ must lie in (0, 1), got ${delta}`);
  return Math.min(Math.max(Math.round(delta * 1e6), 1), 999_999);
}

export interface DrawRule {
  /** draws are whole numbers from 1 to `max` */
  max: 100 | 1000 | 10000;
  /** the largest draw that continues the supergame */
  cutoff: number;
}

/**
 * The draw that implements δ *exactly*: numbers 1–100 when 100·δ is whole (the usual case),
 * else 1–1000 or 1–10000. δ = 0.875 with draws 1–100 would continue with probability 0.87, not the
 * announced 0.875 — a small deception (methods.md §8), so it draws 1–1000 and continues while the
 * draw is ≤ 875. A δ with more than four decimals cannot be implemented exactly (designs refuse
 * it); it gets ⌊10000·δ⌋ out of 10000.
 */
export function drawRule(delta: number): DrawRule {
  const m = deltaMillionths(delta);
  if (m % 10_000 === 0) return { max: 100, cutoff: m / 10_000 };
  if (m % 1_000 === 0) return { max: 1000, cutoff: m / 1_000 };
  return { max: 10000, cutoff: Math.floor(m / 100) };
}

/** Whether the draw can implement δ exactly (at most four decimals). */
export function isImplementable(delta: number): boolean {
  if (!(delta > 0 && delta < 1)) return true; // out of range is the range check's message, not this one
  return deltaMillionths(delta) % 100 === 0 && Math.abs(delta * 1e6 - Math.round(delta * 1e6)) < 1e-6;
}

/** The largest draw that continues the supergame. */
export function cutoffOf(delta: number): number {
  return drawRule(delta).cutoff;
}

/** The continuation probability the draw really implements: cutoff / max (= δ for ≤ 4 decimals). */
export function realisedDelta(delta: number): number {
  const r = drawRule(delta);
  return r.cutoff / r.max;
}

/** The cut-off as the phone shows it, with the range when it is not 1–100: "75", "875 (of 1–1000)". */
export function formatCutoff(delta: number): string {
  const r = drawRule(delta);
  return r.max === 100 ? String(r.cutoff) : `${r.cutoff} (draws run from 1 to ${r.max})`;
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
  const { cutoff, max } = drawRule(delta);
  const rng = rngFor(seed, 'draws', supergame);
  const draws: number[] = [];
  // Continue while draw ≤ cutoff; the draw after the last round is the one above it. Ends with
  // probability one: cutoff < max, so each draw ends the supergame with probability ≥ 1/max.
  for (;;) {
    const d = randomInt(rng, 1, max);
    draws.push(d);
    if (d > cutoff) break;
  }
  const length = draws.length;
  let roundsPlayed = length;
  if (termination.kind === 'block') {
    // Fréchette & Yuksel (2017): play on to the end of the block in which the supergame ended;
    // a draw is still made in each of those rounds (methods.md §2).
    roundsPlayed = Math.ceil(length / termination.k) * termination.k;
    while (draws.length < roundsPlayed) draws.push(randomInt(rng, 1, max));
  }
  return { supergame, draws, length, roundsPlayed };
}

/** The whole sequence of a session: supergames 1..n. */
export function drawSequence(seed: Seed, delta: number, supergames: number, termination: Termination = { kind: 'standard' }): DrawSequence {
  const out: SupergameDraws[] = [];
  for (let s = 1; s <= supergames; s++) out.push(supergameDraws(seed, delta, s, termination));
  return { seed: normaliseSeed(seed), delta, ...drawRule(delta), termination, supergames: out };
}

/** Whether the draw continues the supergame. */
export function continues(draw: number, delta: number): boolean {
  return draw <= cutoffOf(delta);
}

/** The draw in plain words for the phone (product.md, "Play"). */
export function describeDraw(draw: number, delta: number): string {
  const c = formatCutoff(delta);
  return continues(draw, delta)
    ? `Draw ${draw} — another round, because it is ≤ ${c}`
    : `Draw ${draw} — this supergame ends, because it is above ${c}`;
}

/**
 * The end-of-block announcement under block termination: the block's draws, and whether (and in
 * which round) the supergame ended. `firstRound` is the block's first round; `length` is L.
 */
export function describeBlock(draws: readonly number[], firstRound: number, length: number, delta: number): string {
  const c = formatCutoff(delta);
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
