/**
 * A small seeded PRNG (mulberry32) so estimation starts and bootstrap draws are reproducible in
 * Node, the browser and worker threads alike, without a dependency.
 */

export type Rng = () => number;

/** Uniform draws in [0, 1) from a 32-bit seed. */
export function mulberry32(seed: number): Rng {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * A seed for stream `index` derived from `seed`, so replicate r draws the same numbers however the
 * replicates are split into chunks or over workers (murmur3's 32-bit finaliser as the mixer).
 */
export function substreamSeed(seed: number, index: number): number {
  let h = (seed ^ Math.imul(index + 1, 0x9e3779b1)) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  return (h ^ (h >>> 16)) >>> 0;
}
