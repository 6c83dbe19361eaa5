import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import jstat from 'jstat';
import { type Matching, type MatchingInput, type OddCountPolicy, matchMinimisingRepeats, matchSupergame } from '#app/lib/matching';
import { randomInt, rngFor, shuffleInPlace } from '#app/lib/rng';
import { ids, randomHistory as history } from '#tests/helpers/pairs';

const key = (a: string, b: string): string => (a < b ? `${a}|${b}` : `${b}|${a}`);

/** Run supergames 1..count with a fixed group, feeding history and odd counts back in. */
function runSeries(n: number, count: number, policy: OddCountPolicy, seed: string | number = 'series') {
  const people = ids(n);
  const past: [string, string][] = [];
  const odd: Record<string, number> = {};
  const out: Matching[] = [];
  let lastPairs: [string, string][] = [];
  for (let s = 1; s <= count; s++) {
    const m = matchSupergame({ supergame: s, participants: people, pastPairs: past, lastPairs, oddCounts: odd, policy, seed });
    out.push(m);
    past.push(...m.pairs);
    lastPairs = m.pairs;
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

// How fast these run is measured by `npm run bench:matching` (scripts/bench-matching.ts), not here.
describe('large groups', () => {
  it('n = 40 after 11 supergames: no repeated pair', () => {
    const input: MatchingInput = { supergame: 12, participants: ids(40), pastPairs: history(40, 11, 1), policy: computer, seed: 1 };
    const m = matchMinimisingRepeats(input);
    expect(m.repeats).toBe(0);
    checkPartition(m, input);
  });

  it('n = 1000 (odd 999 too) after 30 supergames of random history: no repeated pair, everyone placed once', () => {
    for (const n of [1000, 999]) {
      const past = history(n, 30, n);
      for (let k = 0; k < 3; k++) {
        const input: MatchingInput = { supergame: 31 + k, participants: ids(n), pastPairs: past, policy: sitOut, seed: n + k };
        const m = matchSupergame(input);
        const m2 = matchMinimisingRepeats(input);
        expect(m.repeats).toBe(0);
        expect(m2.repeats).toBe(0);
        checkPartition(m, input);
        checkPartition(m2, input);
      }
    }
  });
});

describe('after everyone has met', () => {
  /** Times each pair met over a series. */
  const meetings = (past: readonly [string, string][]) => {
    const c = new Map<string, number>();
    for (const [a, b] of past) c.set(key(a, b), (c.get(key(a, b)) ?? 0) + 1);
    return c;
  };
  const sizes = [4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 16, 21, 30, 31, 45, 60];

  it('nobody meets the previous partner again when another pairing exists (n = 4–60, odd and even, many seeds)', () => {
    // With n ≥ 3 another pairing always exists: K_n minus a perfect matching still has one for even
    // n ≥ 4, and for odd n the bye moves to someone else [calc]. Before this rule the share was the
    // plain random rate, 1/(n − 1) (methods.md §2: 33 % with 4 people, 14 % with 8).
    for (const n of sizes) {
      for (const seed of [1, 2, 3, 4]) {
        const { out } = runSeries(n, Math.max(20, 2 * n), seed % 2 ? sitOut : computer, seed);
        out.forEach((m) => expect(m.previousAgain, `n=${n} seed=${seed} supergame ${m.supergame}`).toBe(0));
      }
    }
  });

  it('keeps meeting counts as even as arithmetic allows: the most any pair meets is ⌈S·⌊n/2⌋ / C(n, 2)⌉', () => {
    // Pigeonhole [calc]: S supergames hold S·⌊n/2⌋ human pairs over C(n, 2) possible pairs, so some pair
    // meets at least that often; the rule reaches the bound (e.g. n = 8, S = 20: 3, not 4 or 5).
    for (const n of sizes) {
      for (const S of [20, 2 * n + 1]) {
        for (const seed of [7, 8]) {
          const { past } = runSeries(n, S, sitOut, seed);
          const bound = Math.ceil((S * Math.floor(n / 2)) / ((n * (n - 1)) / 2));
          const most = Math.max(...meetings(past).values());
          expect(most, `n=${n} S=${S} seed=${seed}`).toBe(bound);
        }
      }
    }
  });

  it('with people coming and going: previous partners, then repeats, then evenness, exactly (brute force, n ≤ 10)', () => {
    /** Lexicographic best (previous partners again, repeats, Σ met²) by enumeration. */
    const brute = (input: MatchingInput): [number, number, number] => {
      const met = meetings(input.pastPairs as [string, string][]);
      const last = new Set((input.lastPairs ?? []).map(([a, b]) => key(a, b)));
      const cost = (a: string, b: string): [number, number, number] => {
        const m = met.get(key(a, b)) ?? 0;
        return [last.has(key(a, b)) ? 1 : 0, m > 0 ? 1 : 0, 2 * m + 1];
      };
      const add = (x: [number, number, number], y: [number, number, number]): [number, number, number] => [
        x[0] + y[0],
        x[1] + y[1],
        x[2] + y[2],
      ];
      const less = (x: [number, number, number], y: [number, number, number]) => x[0] - y[0] || x[1] - y[1] || x[2] - y[2];
      const best = (rest: string[]): [number, number, number] => {
        if (rest.length === 0) return [0, 0, 0];
        const [a, ...others] = rest;
        let min: [number, number, number] = [Infinity, Infinity, Infinity];
        others.forEach((b, i) => {
          const c = add(cost(a, b), best(others.filter((_, j) => j !== i)));
          if (less(c, min) < 0) min = c;
        });
        return min;
      };
      const people = [...input.participants];
      if (people.length % 2 === 0) return best(people);
      const counts = people.map((id) => input.oddCounts?.[id] ?? 0);
      let min: [number, number, number] = [Infinity, Infinity, Infinity];
      people.forEach((id, i) => {
        if (counts[i] !== Math.min(...counts)) return;
        const c = best(people.filter((x) => x !== id));
        if (less(c, min) < 0) min = c;
      });
      return min;
    };
    const arb = fc
      .record({ n: fc.integer({ min: 2, max: 10 }), seed: fc.integer({ min: 0, max: 2 ** 31 }), rounds: fc.integer({ min: 0, max: 12 }) })
      .map(({ n, seed, rounds }): MatchingInput => {
        // a history of random pairings of random subsets (late joiners, departures)
        const people = ids(n);
        const rng = rngFor(seed, 'draws', 1);
        const pastPairs: [string, string][] = [];
        let lastPairs: [string, string][] = [];
        for (let r = 0; r < rounds; r++) {
          const present = shuffleInPlace(rng, [...people]).slice(0, randomInt(rng, 2, n));
          lastPairs = [];
          for (let i = 0; i + 1 < present.length; i += 2) lastPairs.push([present[i], present[i + 1]]);
          pastPairs.push(...lastPairs);
        }
        const oddCounts: Record<string, number> = {};
        for (const id of people) oddCounts[id] = randomInt(rng, 0, 1);
        return { supergame: rounds + 1, participants: people, pastPairs, lastPairs, oddCounts, policy: sitOut, seed };
      });
    fc.assert(
      fc.property(arb, (input) => {
        const m = matchMinimisingRepeats(input);
        checkPartition(m, input);
        const met = meetings(input.pastPairs as [string, string][]);
        const squares = m.pairs.reduce((sum, [a, b]) => sum + 2 * (met.get(key(a, b)) ?? 0) + 1, 0);
        expect([m.previousAgain, m.repeats, squares]).toEqual(brute(input));
      }),
      { numRuns: 300 },
    );
  });

  it('keeps the first supergame uniform over all pairings (χ², n = 4 and n = 6)', () => {
    // Uniform random matching in the first supergame [practice: random matching, methods.md §2].
    // n = 4 has 3 perfect matchings, n = 6 has 15; 3,000 seeds each, χ² against equal shares.
    for (const [n, count] of [
      [4, 3],
      [6, 15],
    ] as const) {
      const seen = new Map<string, number>();
      const trials = 3000;
      for (let seed = 0; seed < trials; seed++) {
        const m = matchSupergame({ supergame: 1, participants: ids(n), pastPairs: [], policy: sitOut, seed });
        const k = m.pairs
          .map(([a, b]) => key(a, b))
          .sort()
          .join(' ');
        seen.set(k, (seen.get(k) ?? 0) + 1);
      }
      expect(seen.size).toBe(count);
      const expected = trials / count;
      const chi2 = [...seen.values()].reduce((s, o) => s + (o - expected) ** 2 / expected, 0);
      const p = 1 - jstat.jStat.chisquare.cdf(chi2, count - 1);
      expect(p, `n=${n}: χ² = ${chi2.toFixed(2)}`).toBeGreaterThan(0.001);
    }
  });

  it('large classes (n = 200, everyone met once): never the previous partner, nobody a third time', () => {
    const people = ids(200);
    const pastPairs: [string, string][] = [];
    for (let i = 0; i < 200; i++) for (let j = i + 1; j < 200; j++) pastPairs.push([people[i], people[j]]);
    const lastPairs: [string, string][] = [];
    for (let i = 0; i < 200; i += 2) lastPairs.push([people[i], people[i + 1]]);
    const input: MatchingInput = { supergame: 200, participants: people, pastPairs, lastPairs, policy: sitOut, seed: 200 };
    // steps 2–3 alone (step 1 would take a round of the schedule here): above 150 people, the threshold search
    const m = matchMinimisingRepeats(input);
    checkPartition(m, input);
    expect(m.method).toBe('balanced');
    expect(m.previousAgain).toBe(0);
    expect(m.repeats).toBe(100);
  });

  it('is reproducible: the same seed and history give the same pairs', () => {
    const input = (): MatchingInput => {
      const { past, out } = runSeries(8, 9, sitOut, 'again');
      return { supergame: 10, participants: ids(8), pastPairs: past, lastPairs: out[8].pairs, policy: sitOut, seed: 'again' };
    };
    expect(matchSupergame(input())).toEqual(matchSupergame(input()));
  });
});
