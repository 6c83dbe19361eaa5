// Participants and pair histories for matching tests and the matching benchmark.
import { rngFor, shuffleInPlace } from '#app/lib/rng';

/** n participant ids: p0001, p0002, … */
export const ids = (n: number): string[] => Array.from({ length: n }, (_, i) => `p${String(i + 1).padStart(4, '0')}`);

/** `supergames` rounds of random pairs of n people (seeded): the history a long session leaves. */
export function randomHistory(n: number, supergames: number, seed: number): [string, string][] {
  const people = ids(n);
  const rng = rngFor(seed, 'draws', 1);
  const out: [string, string][] = [];
  for (let s = 0; s < supergames; s++) {
    const order = shuffleInPlace(rng, [...people]);
    for (let i = 0; i + 1 < order.length; i += 2) out.push([order[i], order[i + 1]]);
  }
  return out;
}
