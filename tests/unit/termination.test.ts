import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  blockTermination,
  classTimePlanner,
  expectedLength,
  lengthTable,
  lengthVariance,
  medianLength,
  pLengthAtLeast,
  pLengthAtMost,
  pLengthExactly,
  roundsForSupergames,
} from '#app/lib/termination';
import { expectClose } from './helpers';

describe('geometric supergame length', () => {
  it('δ = 3/4: E[L] = 4, P(L=1) = 0.25, P(L≥5) = 0.3164, P(L≥10) = 0.0751, median 3', () => {
    // Source: methods.md §2 check values (formulas [calc], rounding as printed there).
    expect(expectedLength(0.75)).toBe(4);
    expect(pLengthExactly(0.75, 1)).toBe(0.25);
    expect(pLengthAtLeast(0.75, 5)).toBeCloseTo(0.3164, 4);
    expect(pLengthAtLeast(0.75, 10)).toBeCloseTo(0.0751, 4);
    expect(medianLength(0.75)).toBe(3);
  });

  it('δ = 7/8: E[L] = 8, median 6', () => {
    // Source: methods.md §2 check values.
    expect(expectedLength(7 / 8)).toBe(8);
    expect(medianLength(7 / 8)).toBe(6);
  });

  it('δ = 1/2 has median 1 exactly (P(L ≤ 1) = 1/2 counts)', () => {
    // Source: definition of the median used here (smallest k with P(L ≤ k) ≥ 1/2) [calc].
    expect(medianLength(0.5)).toBe(1);
    expect(pLengthAtMost(0.5, 1)).toBe(0.5);
  });

  it('variance δ/(1−δ)² and mean agree with moments summed from the table', () => {
    // Source: methods.md §2, Var = δ/(1−δ)² [calc]; checked here against Σ k² P(L=k).
    for (const delta of [0.5, 0.75, 0.9]) {
      const rows = lengthTable(delta, 2000);
      const m1 = rows.reduce((s, r) => s + r.k * r.exactly, 0);
      const m2 = rows.reduce((s, r) => s + r.k * r.k * r.exactly, 0);
      expectClose(m1, expectedLength(delta), 1e-10);
      expectClose(m2 - m1 * m1, lengthVariance(delta), 1e-9);
    }
  });

  it('the table is a distribution: P(L=k) sum to P(L≤k); P(L≥k) = 1 − P(L≤k−1)', () => {
    // Source: geometric law of methods.md §2.
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 0.99, noNaN: true }), fc.integer({ min: 1, max: 60 }), (delta, kMax) => {
        const rows = lengthTable(delta, kMax);
        let cum = 0;
        for (const r of rows) {
          cum += r.exactly;
          expectClose(r.atMost, cum, 1e-12);
          expectClose(r.atLeast, 1 - (cum - r.exactly), 1e-12);
          expectClose(r.atLeast, pLengthAtLeast(delta, r.k), 1e-12);
          expectClose(r.exactly, pLengthExactly(delta, r.k), 1e-12);
        }
      }),
    );
  });

  it('median: P(L ≤ m) ≥ 1/2 > P(L ≤ m−1)', () => {
    // Source: definition of the median [calc].
    fc.assert(
      fc.property(fc.double({ min: 0.001, max: 0.999, noNaN: true }), (delta) => {
        const m = medianLength(delta);
        expect(pLengthAtMost(delta, m)).toBeGreaterThanOrEqual(0.5);
        if (m > 1) expect(pLengthAtMost(delta, m - 1)).toBeLessThan(0.5);
      }),
    );
  });

  it('rejects δ outside (0,1)', () => {
    expect(() => expectedLength(1)).toThrow(RangeError);
    expect(() => medianLength(0)).toThrow(RangeError);
  });
});

describe('sessions and block termination', () => {
  it('N supergames: mean N/(1−δ), SD √(Nδ)/(1−δ)', () => {
    // Source: methods.md §2 [calc].
    const r = roundsForSupergames(30, 0.75);
    expect(r.mean).toBe(120);
    expectClose(r.sd, Math.sqrt(22.5) / 0.25);
  });

  it('block random termination, δ = 3/4, k = 5: 6.556 rounds played, 4 paid', () => {
    // Source: Fréchette & Yuksel (2017) mechanics [mem]; numbers methods.md §2 [calc].
    const b = blockTermination(0.75, 5);
    expect(b.expectedRoundsPlayed).toBeCloseTo(6.556, 3);
    expect(b.expectedPaidRounds).toBe(4);
    expectClose(b.expectedBlocks, 1 / (1 - 0.75 ** 5));
    // k = 1 is ordinary random termination
    expectClose(blockTermination(0.75, 1).expectedRoundsPlayed, 4);
  });
});

describe('classTimePlanner', () => {
  it('30 supergames at δ = 0.75 and 15 s a round: 120 rounds, 30 minutes, SD ≈ 4.74 minutes', () => {
    // Source: mean and SD of methods.md §2 [calc]: 120 × 15 s = 30 min; SD = 15·√22.5/0.25/60.
    const p = classTimePlanner({ supergames: 30, delta: 0.75, secondsPerRound: 15 });
    expect(p.rounds).toBe(120);
    expect(p.minutes).toBe(30);
    expectClose(p.sdMinutes, (15 * Math.sqrt(22.5)) / 0.25 / 60);
    expect(p.sentence).toBe('30 supergames at δ = 0.75 ≈ 120 rounds ≈ 30 minutes at 15 s a round');
  });

  it('adds a fixed overhead per supergame: 15 s between supergames → 37.5 ≈ 38 minutes', () => {
    // Source: [calc] 30 min of rounds + 30 × 15 s; rounded half-up.
    const p = classTimePlanner({ supergames: 30, delta: 0.75, secondsPerRound: 15, overheadSecondsPerSupergame: 15 });
    expect(p.minutes).toBe(37.5);
    expect(p.sentence).toBe('30 supergames at δ = 0.75 ≈ 120 rounds ≈ 38 minutes at 15 s a round and 15 s between supergames');
  });

  it('prints δ with up to 4 decimals and singular supergame', () => {
    // Source: [calc] 1/(1−7/8) = 8 rounds × 20 s = 160 s ≈ 3 minutes.
    expect(classTimePlanner({ supergames: 1, delta: 7 / 8, secondsPerRound: 20 }).sentence).toBe(
      '1 supergame at δ = 0.875 ≈ 8 rounds ≈ 3 minutes at 20 s a round',
    );
  });
});
