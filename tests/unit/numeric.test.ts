import fc from 'fast-check';
import { solve, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { brentRoot, goldenMin, oneMinusPow, pathValues, solveLinear } from '#app/lib/numeric';
import { expectClose } from './helpers';

describe('solveLinear (Gaussian elimination, partial pivoting)', () => {
  it('solves a system that needs pivoting', () => {
    // Source: [calc] x = (1, 2, 3) substituted by hand; the zero pivot forces a row swap.
    const A = [
      [0, 2, 1],
      [1, 1, 1],
      [2, 0, 3],
    ];
    const x = solveLinear(A, [7, 6, 11]);
    [1, 2, 3].forEach((v, i) => expectClose(x[i], v));
  });

  it('throws on a singular matrix', () => {
    expect(() =>
      solveLinear(
        [
          [1, 2],
          [2, 4],
        ],
        [1, 2],
      ),
    ).toThrow('singular');
  });

  it('agrees with ml-matrix 6.15.1 solve on random diagonally dominant systems', () => {
    // Source: independent reference, ml-matrix `solve` (methods.md §7).
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 12 }).chain((n) =>
          fc.tuple(
            fc.array(fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: n, maxLength: n }), {
              minLength: n,
              maxLength: n,
            }),
            fc.array(fc.double({ min: -100, max: 100, noNaN: true }), { minLength: n, maxLength: n }),
          ),
        ),
        ([A, b]) => {
          const n = A.length;
          const M = A.map((row, i) => row.map((v, j) => (i === j ? v + n + 1 : v)));
          const mine = solveLinear(M, b);
          const ref = solve(new Matrix(M), Matrix.columnVector(b)).to1DArray();
          mine.forEach((v, i) => expectClose(v, ref[i], 1e-10));
        },
      ),
    );
  });
});

describe('pathValues (deterministic paths)', () => {
  it('equals the linear solve of (I − δM)V = r on random functional graphs', () => {
    // Source: methods.md §4 — (I − δM)V = ū; here M is a 0/1 successor matrix [calc].
    fc.assert(
      fc.property(
        fc
          .integer({ min: 1, max: 20 })
          .chain((n) =>
            fc.tuple(
              fc.array(fc.integer({ min: 0, max: n - 1 }), { minLength: n, maxLength: n }),
              fc.array(fc.double({ min: -50, max: 50, noNaN: true }), { minLength: n, maxLength: n }),
            ),
          ),
        fc.double({ min: 0.01, max: 0.99, noNaN: true }),
        ([succ, r], delta) => {
          const n = succ.length;
          const out = pathValues(
            Int32Array.from(succ),
            Float64Array.from(r),
            delta,
            new Float64Array(n),
            new Uint8Array(n),
            new Int32Array(n),
          );
          const A = succ.map((s, i) => {
            const row = new Array<number>(n).fill(0);
            row[i] += 1;
            row[s] -= delta;
            return row;
          });
          const ref = solveLinear(A, r);
          const scale = 50 / (1 - delta);
          out.forEach((v, i) => expect(Math.abs(v - ref[i])).toBeLessThanOrEqual(1e-11 * scale));
        },
      ),
    );
  });

  it('1 − δ^k keeps its digits near δ = 1', () => {
    // Source: [calc] 1 − (1 − 1e-12)^3 = 3e-12 − 3e-24 + 1e-36.
    expectClose(oneMinusPow(1 - 1e-12, 3) / 3e-12, 1, 1e-3);
    expect(oneMinusPow(0.75, 5)).toBeCloseTo(1 - 0.75 ** 5, 15);
  });
});

describe('root and minimum finders', () => {
  it('Brent finds √2 to 1e-15', () => {
    // Source: [calc] the root of x² − 2.
    expect(Math.abs(brentRoot((x) => x * x - 2, 0, 2) - Math.SQRT2)).toBeLessThan(1e-14);
    expect(() => brentRoot((x) => x * x + 1, 0, 2)).toThrow('does not change sign');
  });

  it('golden section finds the kink of |x − 1/3|', () => {
    // Source: [calc] the minimum of |x − 1/3| is at 1/3.
    const m = goldenMin((x) => Math.abs(x - 1 / 3), 0, 1);
    expect(Math.abs(m.x - 1 / 3)).toBeLessThan(1e-14);
  });
});
