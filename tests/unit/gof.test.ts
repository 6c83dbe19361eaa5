import chi2gof from '@stdlib/stats-chi2gof';
import fc from 'fast-check';
import jstat from 'jstat';
import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareSurvival, geometricLengthGof, regularizedGamma } from '#app/lib/gof';

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
    const ref = chi2gof(
      r.bins.map((b) => b.observed),
      r.bins.map((b) => b.expected / r.n),
    );
    expect(r.statistic).toBeCloseTo(ref.statistic, 10);
    expect(r.pValue).toBeCloseTo(ref.pValue, 10);
  });

  it('refuses what cannot be tested', () => {
    expect(() => geometricLengthGof([1, 2.5], 0.5)).toThrow(/integers/);
    expect(() => geometricLengthGof([1, 2], 1)).toThrow(/δ must lie/);
    expect(() => geometricLengthGof([], 0.5)).toThrow(/no supergame lengths/);
  });

  it('small samples (25 supergames at δ = 0.9) get a simulated p-value, seeded and reproducible', () => {
    // n(1−δ) = 2.5 < 5: no two bins can expect 5, so the χ² distribution does not apply.
    const lengths = [1, 3, 12, 5, 9, 2, 20, 7, 1, 14, 6, 4, 30, 8, 10, 2, 11, 17, 3, 9, 5, 1, 25, 13, 6];
    const r = geometricLengthGof(lengths, 0.9, { seed: 1 });
    expect(r.method).toBe('simulated');
    expect(r.replicates).toBe(9999);
    // bins expect ≥ 1: 25·0.1·0.9^(k−1) ≥ 1 up to k = 9, so bins 1…8 and 9+ [calc]
    expect(r.tailFrom).toBe(9);
    expect(r.bins.reduce((s, b) => s + b.expected, 0)).toBeCloseTo(25, 9);
    expect(r.pValue).toBeGreaterThan(0);
    expect(r.pValue).toBeLessThanOrEqual(1);
    expect(geometricLengthGof(lengths, 0.9, { seed: 1 }).pValue).toBe(r.pValue);
  });

  it('the simulated p-value is valid: under the law, p ≤ 0.05 in about 5 % of samples', () => {
    // Source: a valid test's size [common practice]. 400 seeded samples of 20 lengths at δ = 0.9,
    // B = 999 each; the count with p ≤ 0.05 is Binomial(400, 0.05) under the law: mean 20, and
    // 6…36 holds with probability > 0.999 [calc].
    let small = 0;
    for (let s = 0; s < 400; s++) {
      const u = (k: number) => (((Math.sin(s * 97.13 + k * 13.7) * 43758.5453) % 1) + 1) % 1 || 0.5;
      const lengths = Array.from({ length: 20 }, (_, k) => 1 + Math.floor(Math.log(u(k)) / Math.log(0.9)));
      if (geometricLengthGof(lengths, 0.9, { seed: s, replicates: 999 }).pValue <= 0.05) small++;
    }
    expect(small).toBeGreaterThanOrEqual(6);
    expect(small).toBeLessThanOrEqual(36);
  });

  it('with enough supergames the simulated and the χ² p-value agree within Monte Carlo error', () => {
    const lengths = [...Array(55).fill(1), ...Array(20).fill(2), ...Array(15).fill(3), ...Array(6).fill(4), 5, 6, 7, 9];
    const chi = geometricLengthGof(lengths, 0.5);
    // the same bins through the small-sample path: force it by asking every bin to expect ≥ 1000
    const sim = geometricLengthGof(lengths, 0.5, { minExpected: 1000, seed: 3 });
    expect(sim.method).toBe('simulated');
    const same = geometricLengthGof(lengths, 0.5, { tailFrom: sim.tailFrom });
    // standard error of a Monte Carlo p near 0.3 with B = 9,999 is about 0.005: allow 4 of them
    expect(Math.abs(sim.pValue - same.pValue)).toBeLessThan(0.02);
    expect(chi.method).toBe('chi-square');
  });
});
