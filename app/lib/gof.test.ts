import chi2gof from '@stdlib/stats-chi2gof';
import fc from 'fast-check';
import jstat from 'jstat';
import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareSurvival, geometricLengthGof, regularizedGamma } from './gof';

const { jStat } = jstat;

describe('χ² distribution', () => {
  it('matches jStat.chisquare.cdf (jstat 1.9.6) across df and x', () => {
    // Source: methods.md §7, jStat as the independent reference.
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 60 }), fc.double({ min: 1e-3, max: 200, noNaN: true }), (df, x) => {
        expect(Math.abs(chiSquareCdf(x, df) - jStat.chisquare.cdf(x, df))).toBeLessThan(1e-10);
      }),
      { seed: 3, numRuns: 500 },
    );
  });

  it('keeps small upper tails accurate and P + Q = 1', () => {
    // Source: χ²₂ survival is exp(−x/2) exactly (common practice: χ²₂ is exponential with mean 2).
    expect(chiSquareSurvival(60, 2) / Math.exp(-30)).toBeCloseTo(1, 10);
    // Source: χ²₁ at 3.841459 is the 95% point (common practice).
    expect(chiSquareCdf(3.841459, 1)).toBeCloseTo(0.95, 6);
    const { p, q } = regularizedGamma(4.5, 3.2);
    expect(p + q).toBeCloseTo(1, 14);
    expect(chiSquareCdf(0, 3)).toBe(0);
  });
});

describe('geometricLengthGof', () => {
  it('pools the tail from the top so every expected count is ≥ 5; df = bins − 1 with δ known', () => {
    // 100 supergames, δ = 1/2: expected 50, 25, 12.5, 6.25, 3.125 … → bins 1, 2, 3, 4+
    // (4 is the last length whose own expected count reaches 5). Source: methods.md §2.
    const lengths = [...Array(55).fill(1), ...Array(20).fill(2), ...Array(15).fill(3), ...Array(6).fill(4), 5, 6, 7, 9];
    const r = geometricLengthGof(lengths, 0.5);
    expect(r.bins.map((b) => [b.from, b.to, b.observed])).toEqual([
      [1, 1, 55],
      [2, 2, 20],
      [3, 3, 15],
      [4, null, 10],
    ]);
    expect(r.bins.map((b) => b.expected)).toEqual([50, 25, 12.5, 12.5]);
    expect(r.df).toBe(3);
    const statistic = 25 / 50 + 25 / 25 + 6.25 / 12.5 + 6.25 / 12.5;
    expect(r.statistic).toBeCloseTo(statistic, 12);
    // Source: @stdlib/stats-chi2gof 0.2.3 as the independent reference (methods.md §7).
    const ref = chi2gof(r.bins.map((b) => b.observed), r.bins.map((b) => b.expected / r.n));
    expect(r.statistic).toBeCloseTo(ref.statistic, 10);
    expect(r.pValue).toBeCloseTo(ref.pValue, 10);
  });

  it('refuses what cannot be tested', () => {
    expect(() => geometricLengthGof([1, 2, 3], 0.5)).toThrow(/too few supergames/);
    expect(() => geometricLengthGof([1, 2.5], 0.5)).toThrow(/integers/);
    expect(() => geometricLengthGof([1, 2], 1)).toThrow(/δ must lie/);
  });
});
