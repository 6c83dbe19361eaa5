/**
 * Seeded random streams for a session: draws, matching and schedules each get their own stream,
 * so that adding a round of draws or a matching step never shifts any other random number.
 *
 * Integer arithmetic only (xoroshiro128+ and rejection-sampled integers from pure-rand), so the
 * same seed gives the same numbers on every platform.
 */
import { uniformInt } from 'pure-rand/distribution/uniformInt';
import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';
import type { JumpableRandomGenerator } from 'pure-rand/types/JumpableRandomGenerator';

export type Seed = string | number;
/** one seeded stream of integers (pure-rand's jumpable generator); prng.ts's `Rng` is a uniform [0, 1) function */
export type RandomStream = JumpableRandomGenerator;

const UINT32 = 0x1_0000_0000;

/**
 * A session seed as an unsigned 32-bit integer. Integers (or strings of decimal digits, as typed
 * into a form to reuse another session's draws) are taken as they are; any other string is hashed
 * (FNV-1a, 32 bits, over its UTF-8 bytes).
 */
export function normaliseSeed(seed: Seed): number {
  if (typeof seed === 'number') {
    if (!Number.isSafeInteger(seed) || seed < -0x8000_0000 || seed >= UINT32) {
      throw new RangeError(`A numeric seed must be a 32-bit integer, got ${seed}`);
    }
    return seed >>> 0;
  }
  const text = seed.trim();
  if (text === '') throw new RangeError('The seed is empty');
  if (/^\d{1,10}$/.test(text) && Number(text) < UINT32) return Number(text);
  let h = 0x811c9dc5;
  for (const byte of new TextEncoder().encode(text)) {
    h ^= byte;
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

/** MurmurHash3's finaliser: spreads nearby seeds (1, 2, 3 …) over the whole 32-bit range. */
function mix32(x: number): number {
  let h = x | 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/** Separate domains so the draw stream and the matching stream of one seed never coincide. */
const DOMAINS = { draws: 0x64726177, matching: 0x6d617463, schedule: 0x73636864, gof: 0x676f6674 } as const;
export type RngDomain = keyof typeof DOMAINS;

/**
 * Stream `index` (≥ 0) of a domain: the domain's generator jumped `index + 1` times (each jump of
 * xoroshiro128+ skips 2^64 numbers, so the streams never overlap in practice).
 */
export function rngFor(seed: Seed, domain: RngDomain, index: number): RandomStream {
  if (!Number.isInteger(index) || index < 0) throw new RangeError(`Bad stream index ${index}`);
  const rng = xoroshiro128plus(mix32(normaliseSeed(seed) ^ DOMAINS[domain]) | 0);
  // xoroshiro128+ seeded from 32 bits starts in a sparse state; a few outputs fill it out.
  for (let i = 0; i < 16; i++) rng.next();
  for (let i = 0; i <= index; i++) rng.jump();
  return rng;
}

/** Unbiased integer in [from, to] (rejection sampling inside pure-rand). */
export function randomInt(rng: RandomStream, from: number, to: number): number {
  return uniformInt(rng, from, to);
}

/** Fisher–Yates shuffle, in place; returns the same array. */
export function shuffleInPlace<T>(rng: RandomStream, items: T[]): T[] {
  for (let i = items.length - 1; i > 0; i--) {
    const j = uniformInt(rng, 0, i);
    const t = items[i];
    items[i] = items[j];
    items[j] = t;
  }
  return items;
}
