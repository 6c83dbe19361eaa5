import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type Matching, type MatchingInput, type OddCountPolicy, matchMinimisingRepeats, matchSupergame } from '../../app/lib/matching';
import { randomInt, rngFor, shuffleInPlace } from '../../app/lib/rng';

const ids = (n: number): string[] => Array.from({ length: n }, (_, i) => `p${String(i + 1).padStart(4, '0')}`);
const key = (a: string, b: string): string => (a < b ? `${a}|${b}` : `${b}|${a}`);

/** Run supergames 1..count with a fixed group, feeding history and odd counts back in. */
function runSeries(n: number, count: number, policy: OddCountPolicy, seed: string | number = 'series') {
  const people = ids(n);
  const past: [string, string][] = [];
  const odd: Record<string, number> = {};
  const out: Matching[] = [];
  for (let s = 1; s <= count; s++) {
    const m = matchSupergame({ supergame: s, participants: people, pastPairs: past, oddCounts: odd, policy, seed });
    out.push(m);
    past.push(...m.pairs);
    if (m.odd) odd[m.odd.participantId] = (odd[m.odd.participantId] ?? 0) + 1;
  }
  return { out, odd, past };
}

function checkPartition(m: Matching, input: MatchingInput): void {
  const seen = m.pairs.flat().concat(m.odd ? [m.odd.participantId] : []);
  expect([...seen].sort()).toEqual([...input.participants].sort());
  expect(m.odd !== null).toBe(input.participants.length % 2 === 1);
  if (m.odd) {
    const counts = input.participants.map((id) => input.oddCounts?.[id] ?? 0);
    expect(input.oddCounts?.[m.odd.participantId] ?? 0).toBe(Math.min(...counts));
  }
  const met = new Set(input.pastPairs.map(([a, b]) => key(a, b)));
  expect(m.repeats).toBe(m.pairs.filter(([a, b]) => met.has(key(a, b))).length);
}

/** Fewest repeat pairs by enumeration (small n only): the independent check of exactness. */
function bruteForceRepeats(input: MatchingInput): number {
  const people = [...input.participants];
  const met = new Set(input.pastPairs.map(([a, b]) => key(a, b)));
  const best = (rest: string[]): number => {
    if (rest.length === 0) return 0;
    const [a, ...others] = rest;
    let min = Number.POSITIVE_INFINITY;
    for (let i = 0; i < others.length; i++) {
      const b = others[i];
      const r = (met.has(key(a, b)) ? 1 : 0) + best(others.filter((_, j) => j !== i));
      if (r < min) min = r;
    }
    return min;
  };
  if (people.length % 2 === 0) return best(people);
  const counts = people.map((id) => input.oddCounts?.[id] ?? 0);
  const fewest = Math.min(...counts);
  let min = Number.POSITIVE_INFINITY;
  people.forEach((id, i) => {
    if (counts[i] === fewest) min = Math.min(min, best(people.filter((x) => x !== id)));
  });
  return min;
}

const computer: OddCountPolicy = { kind: 'computer', strategy: 'TFT' };
const sitOut: OddCountPolicy = { kind: 'sit-out' };

describe('perfect strangers while the head-count allows', () => {
  it('n = 8: supergames 1–7 repeat nobody (a round-robin exists for even n), the 8th must', () => {
    // common practice: K_n has a 1-factorisation for even n, so n − 1 rounds of perfect strangers
    const { out, past } = runSeries(8, 8, computer);
    out.slice(0, 7).forEach((m) => expect(m.repeats).toBe(0));
    expect(new Set(past.slice(0, 28).map(([a, b]) => key(a, b))).size).toBe(28); // every pair once
    expect(out[7].repeats).toBe(4); // everyone has met everyone: all 4 pairs repeat
  });

  it('holds for many seeds and even sizes up to 40', () => {
    for (const n of [2, 4, 6, 10, 16, 40]) {
      for (const seed of [1, 2, 3]) {
        const { out } = runSeries(n, n - 1, computer, seed);
        out.forEach((m) => expect(m.repeats).toBe(0));
      }
    }
  });

  it('odd n = 7 with sit-outs: 7 supergames, nobody meets twice, everyone sits out once', () => {
    const { out, odd } = runSeries(7, 7, sitOut);
    out.forEach((m) => {
      expect(m.repeats).toBe(0);
      expect(m.odd?.kind).toBe('sit-out');
    });
    expect(Object.values(odd).sort()).toEqual([1, 1, 1, 1, 1, 1, 1]);
  });

  it('odd n = 7 with a computer partner: it rotates, fewest-times-first, and is disclosed by strategy', () => {
    const { out, odd } = runSeries(7, 10, computer);
    out.forEach((m) => expect(m.odd).toMatchObject({ kind: 'computer', strategy: 'TFT' }));
    // after 10 supergames: 7 had it once, then 3 of them a second time
    expect(Object.values(odd).sort()).toEqual([1, 1, 1, 1, 2, 2, 2]);
    out.slice(0, 7).forEach((m) => expect(m.repeats).toBe(0));
  });

  it('3 participants: one pair and one odd seat, which rotates', () => {
    const { out, odd } = runSeries(3, 3, sitOut);
    out.forEach((m) => expect(m.pairs).toHaveLength(1));
    expect(Object.values(odd)).toEqual([1, 1, 1]);
  });
});

describe('fewest repeats, exactly', () => {
  const arbInput = fc
    .record({
      n: fc.integer({ min: 0, max: 11 }),
      seed: fc.integer({ min: 0, max: 2 ** 31 }),
      supergame: fc.integer({ min: 1, max: 30 }),
      density: fc.integer({ min: 0, max: 100 }),
      policy: fc.constantFrom(computer, sitOut),
    })
    .map(({ n, seed, supergame, density, policy }): MatchingInput => {
      // a random history: any pair may have met (as after late joins and departures)
      const people = ids(n);
      const rng = rngFor(seed, 'draws', 0);
      const pastPairs: [string, string][] = [];
      for (let i = 0; i < n; i++) {
        for (let j = i + 1; j < n; j++) if (randomInt(rng, 1, 100) <= density) pastPairs.push([people[i], people[j]]);
      }
      const oddCounts: Record<string, number> = {};
      for (const id of people) oddCounts[id] = randomInt(rng, 0, 2);
      return { supergame, participants: shuffleInPlace(rng, people), pastPairs, oddCounts, policy, seed };
    });

  it('equals the brute-force minimum of repeat pairs for n ≤ 11 (both steps, and step 2 alone)', () => {
    fc.assert(
      fc.property(arbInput, (input) => {
        const expected = bruteForceRepeats(input);
        const m = matchSupergame(input);
        checkPartition(m, input);
        expect(m.repeats).toBe(expected);
        const m2 = matchMinimisingRepeats(input);
        checkPartition(m2, input);
        expect(m2.repeats).toBe(expected);
      }),
      { numRuns: 300 },
    );
  });

  it('is deterministic for a seed and random across seeds and supergames', () => {
    const input: MatchingInput = { supergame: 3, participants: ids(20), pastPairs: [], policy: computer, seed: 5 };
    expect(matchSupergame(input)).toEqual(matchSupergame(input));
    const variants = new Set<string>();
    for (let seed = 0; seed < 20; seed++) variants.add(JSON.stringify(matchMinimisingRepeats({ ...input, seed }).pairs));
    expect(variants.size).toBeGreaterThan(15);
  });

  it('gives a late joiner new partners and keeps the others apart from old partners', () => {
    const { past, odd } = runSeries(8, 3, computer, 'late');
    const people = [...ids(8), 'late-joiner'];
    const m = matchSupergame({ supergame: 4, participants: people, pastPairs: past, oddCounts: odd, policy: computer, seed: 'late' });
    expect(m.repeats).toBe(0);
    expect(m.odd).not.toBeNull();
  });
});

describe('speed', () => {
  const history = (n: number, supergames: number, seed: number): [string, string][] => {
    const people = ids(n);
    const rng = rngFor(seed, 'draws', 1);
    const out: [string, string][] = [];
    for (let s = 0; s < supergames; s++) {
      const order = shuffleInPlace(rng, [...people]);
      for (let i = 0; i + 1 < order.length; i += 2) out.push([order[i], order[i + 1]]);
    }
    return out;
  };

  it('n = 40: exact in a few ms', () => {
    const input: MatchingInput = { supergame: 12, participants: ids(40), pastPairs: history(40, 11, 1), policy: computer, seed: 1 };
    matchMinimisingRepeats(input); // warm up the JIT
    const t = performance.now();
    const m = matchMinimisingRepeats(input);
    expect(performance.now() - t).toBeLessThan(10);
    expect(m.repeats).toBe(0);
  });

  it('n = 1000 (odd 999 too) after 30 supergames of random history: median well under 50 ms', () => {
    // median of 5 timed runs after 3 warm-up runs, so JIT compilation and GC pauses do not count
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
    for (const n of [1000, 999]) {
      const past = history(n, 30, n);
      const input = (k: number): MatchingInput => ({ supergame: 31 + k, participants: ids(n), pastPairs: past, policy: sitOut, seed: n + k });
      for (let k = 0; k < 3; k++) matchSupergame(input(k));
      const full: number[] = [];
      const blossom: number[] = [];
      for (let k = 3; k < 8; k++) {
        let t = performance.now();
        const m = matchSupergame(input(k));
        full.push(performance.now() - t);
        t = performance.now();
        const m2 = matchMinimisingRepeats(input(k));
        blossom.push(performance.now() - t);
        expect(m.repeats).toBe(0);
        expect(m2.repeats).toBe(0);
        checkPartition(m2, input(k));
      }
      expect(median(full)).toBeLessThan(50);
      expect(median(blossom)).toBeLessThan(50);
    }
  });
});
