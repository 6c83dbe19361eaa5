import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { libraryStrategy } from '#app/lib/automata';
import {
  defaultBackground,
  fitness,
  interiorRestPoint,
  iterateReplicator,
  meanFitness,
  replicatorDerivative,
  replicatorStep,
} from '#app/lib/replicator';
import { sizeBAD } from '#app/lib/thresholds';
import { valueMatrix } from '#app/lib/values';
import { expectClose } from './helpers';

// Source: methods.md §6 check — (Grim, ALLD) at T=50, S=12, P=25, R=48, δ = 3/4.
const A = [
  [192, 87],
  [125, 100],
];
const x = [0.2, 0.8];

describe('replicator dynamics, methods.md §6 check', () => {
  it('A is the valueMatrix of (Grim, ALLD) at T=50, S=12, P=25, R=48, δ = 3/4', () => {
    // Source: methods.md §4 check matrix and §6 [calc].
    const V = valueMatrix([libraryStrategy('Grim'), libraryStrategy('ALLD')], { T: 50, S: 12, P: 25, R: 48 }, 0.75);
    V.forEach((row, j) => row.forEach((v, k) => expectClose(v, A[j][k])));
  });

  it('f = (108, 105), f̄ = 105.6', () => {
    // Source: methods.md §6 [calc].
    fitness(A, x).forEach((f, j) => expectClose(f, [108, 105][j]));
    expectClose(meanFitness(A, x), 105.6);
  });

  it("x' = (0.2045454…, 0.7954545…) with c = 0 (the default here: all payoffs positive)", () => {
    // Source: methods.md §6 [calc]: 0.2 × 108 / 105.6 = 9/44.
    expect(defaultBackground(A)).toBe(0);
    const y = replicatorStep(A, x);
    expectClose(y[0], 9 / 44);
    expectClose(y[1], 35 / 44);
  });

  it('ẋ = (0.48, −0.48)', () => {
    // Source: methods.md §6 [calc].
    const d = replicatorDerivative(A, x);
    expectClose(d[0], 0.48);
    expectClose(d[1], -0.48);
  });

  it('interior rest point at Grim share 0.1625 = sizeBAD', () => {
    // Source: methods.md §6 [calc]; sizeBAD(3/4, R=48) = 13/80 in the Dal Bó & Fréchette table (§1).
    const r = interiorRestPoint(A)!;
    expectClose(r[0], 0.1625);
    expectClose(r[0], sizeBAD({ T: 50, S: 12, P: 25, R: 48 }, 0.75));
    replicatorDerivative(A, r).forEach((v) => expect(Math.abs(v)).toBeLessThan(1e-12));
  });

  it('iterating from either side of 0.1625 reaches the vertex on that side', () => {
    // Source: [calc] (Grim, ALLD) here is a coordination game (192 > 125, 100 > 87), so the
    // interior rest point is unstable and separates the basins.
    const up = iterateReplicator(A, [0.2, 0.8]);
    expect(up.converged).toBe(true);
    expect(up.x[0]).toBeGreaterThan(1 - 1e-9);
    const down = iterateReplicator(A, [0.15, 0.85]);
    expect(down.converged).toBe(true);
    expect(down.x[1]).toBeGreaterThan(1 - 1e-9);
  });
});

describe('general properties', () => {
  const arbMatrix = fc
    .integer({ min: 2, max: 5 })
    .chain((n) =>
      fc.tuple(
        fc.array(fc.array(fc.double({ min: -50, max: 50, noNaN: true }), { minLength: n, maxLength: n }), { minLength: n, maxLength: n }),
        fc.array(fc.double({ min: 0.01, max: 1, noNaN: true }), { minLength: n, maxLength: n }),
      ),
    );

  it('shares stay on the simplex and ẋ sums to 0', () => {
    // Source: [calc] Σ x_j(f_j − f̄) = f̄ − f̄ = 0; the discrete map divides by c + f̄.
    fc.assert(
      fc.property(arbMatrix, ([M, w]) => {
        const s = w.reduce((a, b) => a + b, 0);
        const p = w.map((v) => v / s);
        expect(Math.abs(replicatorDerivative(M, p).reduce((a, b) => a + b, 0))).toBeLessThan(1e-10);
        const q = replicatorStep(M, p);
        expect(Math.abs(q.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-12);
        q.forEach((v) => expect(v).toBeGreaterThanOrEqual(0));
      }),
    );
  });

  it('the default background makes every c + f_j positive', () => {
    // Source: methods.md §6 ("background fitness c making all fitnesses positive").
    const M = [
      [-3, 1],
      [2, -5],
    ];
    expect(defaultBackground(M)).toBe(6);
    expect(replicatorStep(M, [0.5, 0.5]).every((v) => v > 0)).toBe(true);
  });

  it('rock-paper-scissors has its interior rest point at (1/3, 1/3, 1/3)', () => {
    // Source: [calc] symmetric zero-sum cycle; every strategy earns 0 at the barycentre.
    const rps = [
      [0, -1, 1],
      [1, 0, -1],
      [-1, 1, 0],
    ];
    interiorRestPoint(rps)!.forEach((v) => expectClose(v, 1 / 3));
    // a rest point with support {0, 1} does not exist (paper beats rock outright)
    expect(interiorRestPoint(rps, [0, 1])).toBeNull();
  });
});
