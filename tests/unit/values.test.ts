import fc from 'fast-check';
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { LIBRARY, libraryStrategy } from '#app/lib/automata';
import { solveLinear } from '#app/lib/numeric';
import { expectedTotal, jointSystem, perRoundValue, valueMatrix } from '#app/lib/values';
import { ALTERNATE, arbAutomaton, arbDelta, arbGame, expectClose } from './helpers';

const S = (id: string) => libraryStrategy(id);
const DBF48 = { T: 50, S: 12, P: 25, R: 48 };
const AXELROD = { T: 5, R: 3, P: 1, S: 0 };

describe('check matrix, T=50, S=12, P=25, R=48, δ = 3/4, ε = 0', () => {
  // Source: methods.md §4 check matrix [calc] (payoffs of Dal Bó & Fréchette 2011).
  const ids = ['ALLD', 'ALLC', 'Grim', 'TFT', 'STFT', 'WSLS', 'T2', 'TF2T'];
  const A = valueMatrix(ids.map(S), DBF48, 0.75);

  it('ALLD row = 100, 200, 125, 125, 100, 157.143, 143.243, 143.750', () => {
    const expected = [100, 200, 125, 125, 100, 157.143, 143.243, 143.75];
    A[0].forEach((v, k) => expect(v).toBeCloseTo(expected[k], 3));
  });

  it('TFT vs STFT = 113.143; STFT vs TFT = 134.857; Grim vs ALLD = 87', () => {
    expect(A[3][4]).toBeCloseTo(113.143, 3);
    expect(A[4][3]).toBeCloseTo(134.857, 3);
    expect(A[2][0]).toBeCloseTo(87, 12);
  });
});

describe('closed forms with ε = 0 equal the linear solve', () => {
  // Source: methods.md §4 closed forms (ALLD vs WSLS, T2, TF2T); the others [calc] from the
  // automata of methods.md §3 (Grim vs ALLD: S then P forever; TFT vs STFT alternate S, T …).
  const forms: [string, string, (g: typeof DBF48, d: number) => number][] = [
    ['ALLD', 'WSLS', (g, d) => (g.T + d * g.P) / (1 - d * d)],
    ['ALLD', 'T2', (g, d) => (g.T + d * g.P + d * d * g.P) / (1 - d ** 3)],
    ['ALLD', 'TF2T', (g, d) => g.T + d * g.T + (d * d * g.P) / (1 - d)],
    ['ALLD', 'Grim', (g, d) => g.T + (d * g.P) / (1 - d)],
    ['ALLD', 'ALLC', (g, d) => g.T / (1 - d)],
    ['Grim', 'ALLD', (g, d) => g.S + (d * g.P) / (1 - d)],
    ['Grim', 'Grim', (g, d) => g.R / (1 - d)],
    ['TFT', 'STFT', (g, d) => (g.S + d * g.T) / (1 - d * d)],
    ['STFT', 'TFT', (g, d) => (g.T + d * g.S) / (1 - d * d)],
  ];
  it.each(forms)('%s vs %s, random payoffs and δ', (a, b, f) => {
    fc.assert(
      fc.property(arbGame, arbDelta, (game, delta) => {
        const v = expectedTotal(S(a), S(b), game, delta);
        const scale = Math.max(Math.abs(game.T), Math.abs(game.S)) / (1 - delta);
        expect(Math.abs(v - f(game, delta))).toBeLessThanOrEqual(1e-12 * scale);
      }),
    );
  });

  it('v = (1−δ)V: TFT vs TFT earns R a round', () => {
    // Source: methods.md §0 (v = (1−δ)V); mutual cooperation pays R each round.
    expectClose(perRoundValue(S('TFT'), S('TFT'), DBF48, 0.75), 48);
  });
});

describe("Axelrod's payoffs at δ = 2/3 (the TFT-Nash threshold)", () => {
  it('cooperate V = 9, alternate V = 9, defect forever V = 7', () => {
    // Source: methods.md §1 check values [calc]; payoffs Axelrod (1984), p. 8.
    expectClose(expectedTotal(S('TFT'), S('TFT'), AXELROD, 2 / 3), 9);
    expectClose(expectedTotal(ALTERNATE, S('TFT'), AXELROD, 2 / 3), 9);
    expectClose(expectedTotal(S('ALLD'), S('TFT'), AXELROD, 2 / 3), 7);
  });
});

describe('Dal Bó & Fréchette (2011), δ = 3/4, R = 32', () => {
  it('alternating against TFT earns 134.857 > 128 from cooperating', () => {
    // Source: methods.md §1 note (3/4, 32) [calc].
    const g = { T: 50, S: 12, P: 25, R: 32 };
    expect(expectedTotal(ALTERNATE, S('TFT'), g, 0.75)).toBeCloseTo(134.857, 3);
    expectClose(expectedTotal(S('TFT'), S('TFT'), g, 0.75), 128);
  });
});

describe('execution errors', () => {
  it('Axelrod payoffs, δ = 0.9, ε = 0.05', () => {
    // Source: methods.md §4 noisy check [calc], to the decimals printed there.
    const a = (x: string, y: string) => expectedTotal(S(x), S(y), AXELROD, 0.9, 0.05);
    expect(a('TFT', 'WSLS')).toBeCloseTo(25.439374, 6);
    expect(a('WSLS', 'TFT')).toBeCloseTo(25.788711, 6);
    expect(a('TFT', 'TFT')).toBeCloseTo(26.49, 3);
    expect(a('ALLD', 'ALLD')).toBeCloseTo(11.475, 12);
  });

  it('ALLD vs ALLD: each round is an independent lottery over the four outcomes', () => {
    // Source: [calc] E[u] = (1−ε)²P + (1−ε)εT + ε(1−ε)S + ε²R each round, V = E[u]/(1−δ).
    fc.assert(
      fc.property(arbGame, arbDelta, fc.double({ min: 0, max: 0.5, noNaN: true }), (g, d, e) => {
        const eu = (1 - e) ** 2 * g.P + (1 - e) * e * g.T + e * (1 - e) * g.S + e * e * g.R;
        const v = expectedTotal(S('ALLD'), S('ALLD'), g, d, e);
        expect(Math.abs(v - eu / (1 - d))).toBeLessThanOrEqual((1e-12 * (Math.abs(g.T) + Math.abs(g.S) + 1)) / (1 - d));
      }),
    );
  });

  it('transitions follow observed actions: Grim vs ALLC leaves cooperation on either flip', () => {
    // Source: methods.md §3 convention (own actual action counts). [calc] Grim's C-state sees cc
    // with probability (1−ε)², else it defects forever, so
    // V_D = E[u | Grim D, ALLC C]/(1−δ), V_C = (E[u | C, C] + δ(1 − (1−ε)²)V_D) / (1 − δ(1−ε)²).
    fc.assert(
      fc.property(arbGame, arbDelta, fc.double({ min: 0.001, max: 0.5, noNaN: true }), (g, d, e) => {
        const q = 1 - e;
        const uC = q * q * g.R + q * e * g.S + e * q * g.T + e * e * g.P;
        const uD = q * q * g.T + q * e * g.P + e * q * g.R + e * e * g.S;
        const vD = uD / (1 - d);
        const vC = (uC + d * (1 - q * q) * vD) / (1 - d * q * q);
        const v = expectedTotal(S('Grim'), S('ALLC'), g, d, e);
        expect(Math.abs(v - vC)).toBeLessThanOrEqual((1e-11 * (Math.abs(g.T) + Math.abs(g.S) + 1)) / (1 - d));
      }),
    );
  });
});

describe('independent solver', () => {
  it('ml-matrix 6.15.1 solve agrees on the (I − δM) systems of random automata and ε', () => {
    // Source: independent reference, ml-matrix `solve` (methods.md §7).
    fc.assert(
      fc.property(arbAutomaton(4), arbAutomaton(4), arbGame, arbDelta, fc.double({ min: 0, max: 0.3, noNaN: true }), (a, b, g, d, e) => {
        const sys = jointSystem(a, b, g, d, e);
        const mine = solveLinear(sys.matrix, sys.rhs);
        const ref = solve(new Matrix(sys.matrix), Matrix.columnVector(sys.rhs)).to1DArray();
        const scale = Math.max(Math.abs(g.T), Math.abs(g.S), Math.abs(g.P), Math.abs(g.R)) / (1 - d);
        mine.forEach((v, i) => expect(Math.abs(v - ref[i])).toBeLessThanOrEqual(1e-11 * scale));
      }),
      { numRuns: 200 },
    );
  });

  it('ml-matrix agrees on every library pair at the check-matrix parameters, noisy', () => {
    // Source: independent reference, ml-matrix `solve` (methods.md §7).
    for (const a of LIBRARY) {
      for (const b of LIBRARY) {
        const sys = jointSystem(a, b, DBF48, 0.75, 0.05);
        const ref = solve(new Matrix(sys.matrix), Matrix.columnVector(sys.rhs)).get(0, 0);
        expectClose(expectedTotal(a, b, DBF48, 0.75, 0.05), ref, 1e-11);
      }
    }
  });
});

describe('joint states', () => {
  it('only (0,0)-reachable states enter the system; with ε = 0 ALLD vs ALLD has one', () => {
    expect(jointSystem(S('ALLD'), S('ALLD'), DBF48, 0.5).states).toEqual([[0, 0]]);
    // with noise every pair of TFT states is reachable
    expect(jointSystem(S('TFT'), S('TFT'), DBF48, 0.5, 0.1).states).toHaveLength(4);
  });

  it('rejects δ and ε out of range', () => {
    expect(() => expectedTotal(S('TFT'), S('TFT'), DBF48, 1)).toThrow(RangeError);
    expect(() => expectedTotal(S('TFT'), S('TFT'), DBF48, 0.5, -0.1)).toThrow(RangeError);
  });
});
