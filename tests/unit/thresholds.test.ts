import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { basinWords, grimSPE, riskDominance, sizeBAD, tftNash, tftSPE, theoryAt, wslsSPE } from '#app/lib/thresholds';
import { arbDelta, arbGame, expectClose } from './helpers';

const AXELROD = { T: 5, R: 3, P: 1, S: 0 };

describe("Axelrod's payoffs T=5, R=3, P=1, S=0", () => {
  // Source: payoffs Axelrod (1984), p. 8; every value below methods.md §1 check values [calc].
  it('grim 1/2, TFT-NE 2/3, δ_RD 3/5', () => {
    expect(grimSPE(AXELROD)).toBe(1 / 2);
    expect(tftNash(AXELROD)).toEqual({ threshold: 2 / 3, binding: 'alternate', defectForever: 1 / 2, alternate: 2 / 3 });
    expect(riskDominance(AXELROD)).toBe(3 / 5);
  });

  it('sizeBAD(2/3) = 1/3, sizeBAD(0.9) = 1/17', () => {
    expectClose(sizeBAD(AXELROD, 2 / 3), 1 / 3);
    expectClose(sizeBAD(AXELROD, 0.9), 1 / 17);
  });

  it('WSLS never SPE (g = 1); TFT never SPE (2/3 ≠ 1/4)', () => {
    expect(wslsSPE(AXELROD)).toBeNull();
    expect(tftSPE(AXELROD)).toEqual({ kind: 'never' });
  });
});

describe('the classroom case T=4, R=3, P=2, S=1', () => {
  it('grim and TFT-NE thresholds are both exactly 1/2', () => {
    // Source: methods.md §1 — a common classroom parameterisation [common practice].
    expect(grimSPE({ T: 4, R: 3, P: 2, S: 1 })).toBe(1 / 2);
    const t = tftNash({ T: 4, R: 3, P: 2, S: 1 });
    expect(t.threshold).toBe(1 / 2);
    // both deviations bind at once; the tie is reported as 'defect-forever'
    expect(t.binding).toBe('defect-forever');
  });
});

describe('the knife edge R=2, T=3, S=−1, P=0', () => {
  it('TFT is SPE only at δ = 1/3', () => {
    // Source: methods.md §1 [calc; the example is Mailath & Samuelson's (2006), mem].
    const r = tftSPE({ T: 3, R: 2, P: 0, S: -1 });
    expect(r.kind).toBe('knife-edge');
    if (r.kind === 'knife-edge') expectClose(r.delta, 1 / 3);
    expect(theoryAt({ T: 3, R: 2, P: 0, S: -1 }, 1 / 3).verdicts.tftSPE).toBe(true);
    expect(theoryAt({ T: 3, R: 2, P: 0, S: -1 }, 0.34).verdicts.tftSPE).toBe(false);
  });
});

describe('Dal Bó & Fréchette (2011) design, T=50, S=12, P=25', () => {
  // Source: payoffs and δ Dal Bó & Fréchette (2011); thresholds, verdicts and sizeBAD from the
  // table in methods.md §1 [calc from the formulas of §1].
  const rows: [number, number, number, number, boolean, boolean, number, number][] = [
    // δ, R, δ_SPE, δ_RD, coop SPE, coop RD, sizeBAD, TFT-NE threshold
    [1 / 2, 32, 18 / 25, 31 / 38, false, false, 1, 9 / 10],
    [1 / 2, 40, 2 / 5, 23 / 38, true, false, 13 / 18, 2 / 5],
    [1 / 2, 48, 2 / 25, 15 / 38, true, true, 13 / 34, 2 / 25],
    [3 / 4, 32, 18 / 25, 31 / 38, true, false, 13 / 16, 9 / 10],
    [3 / 4, 40, 2 / 5, 23 / 38, true, true, 13 / 48, 2 / 5],
    [3 / 4, 48, 2 / 25, 15 / 38, true, true, 13 / 80, 2 / 25],
  ];
  it.each(rows)('δ = %d, R = %d', (delta, R, dSPE, dRD, coopSPE, coopRD, bad, tftNE) => {
    const game = { T: 50, S: 12, P: 25, R };
    const t = theoryAt(game, delta);
    expectClose(t.grimSPE, dSPE);
    expectClose(t.riskDominance, dRD);
    expect(t.verdicts.grimSPE).toBe(coopSPE);
    expect(t.verdicts.riskDominant).toBe(coopRD);
    expectClose(t.sizeBAD, bad);
    expectClose(t.tftNash.threshold, tftNE);
    // sizeBAD < 1/2 ⇔ δ > δ_RD (methods.md §1 properties)
    expect(t.sizeBAD < 0.5).toBe(delta > dRD);
  });

  it('(3/4, 32): grim is SPE but TFT is not even Nash', () => {
    // Source: methods.md §1 note [calc].
    const t = theoryAt({ T: 50, S: 12, P: 25, R: 32 }, 3 / 4);
    expect(t.verdicts.grimSPE).toBe(true);
    expect(t.verdicts.tftNash).toBe(false);
    expect(t.tftNash.binding).toBe('alternate');
  });
});

describe('threshold properties for random payoffs', () => {
  it('grim = g/(1+g), δ_RD = (g+l)/(1+g+l)', () => {
    // Source: methods.md §1 (both forms of each threshold).
    fc.assert(
      fc.property(arbGame, (game) => {
        const g = (game.T - game.R) / (game.R - game.P);
        const l = (game.P - game.S) / (game.R - game.P);
        expectClose(grimSPE(game), g / (1 + g));
        expectClose(riskDominance(game), (g + l) / (1 + g + l));
      }),
    );
  });

  it('sizeBAD = 1 at δ_SPE; sizeBAD < 1/2 ⇔ δ > δ_RD; sizeBAD ∈ (0,1]', () => {
    // Source: methods.md §1 properties.
    fc.assert(
      fc.property(arbGame, arbDelta, (game, delta) => {
        expect(sizeBAD(game, grimSPE(game))).toBe(1);
        // just above δ_SPE the raw formula is continuous with the convention
        expectClose(sizeBAD(game, grimSPE(game) + 1e-9), 1, 1e-4);
        const s = sizeBAD(game, delta);
        expect(s).toBeGreaterThan(0);
        expect(s).toBeLessThanOrEqual(1);
        const rd = riskDominance(game);
        if (Math.abs(delta - rd) > 1e-9) expect(s < 0.5).toBe(delta > rd);
      }),
    );
  });

  it('TFT-NE threshold is the max of the two deviations and the knife edge needs equal ratios', () => {
    // Source: Axelrod (1981, 1984) via methods.md §1; knife edge Kalai, Samet & Stanford (1988) [mem].
    fc.assert(
      fc.property(arbGame, (game) => {
        const t = tftNash(game);
        expect(t.threshold).toBe(Math.max(t.defectForever, t.alternate));
        expect(t.binding === 'alternate').toBe(t.alternate > t.defectForever);
        expect(t.defectForever).toBe(grimSPE(game));
        const a = (game.T - game.R) / (game.R - game.S);
        const b = (game.P - game.S) / (game.T - game.P);
        expect(tftSPE(game).kind).toBe(Math.abs(a - b) < 1e-12 && a < 1 ? 'knife-edge' : 'never');
        const w = wslsSPE(game);
        expect(w === null).toBe(2 * game.R <= game.T + game.P);
      }),
    );
  });
});

describe('theoryAt', () => {
  it('reports every threshold and verdict, counting the boundary as yes', () => {
    // Source: Axelrod's payoffs (1984, p. 8); thresholds methods.md §1 [calc].
    const t = theoryAt(AXELROD, 0.5);
    expect(t.verdicts).toEqual({ grimSPE: true, tftNash: false, tftSPE: false, wslsSPE: false, riskDominant: false, basin: 'defection' });
    expect(t.g).toBe(1);
    expect(t.l).toBe(0.5);
    expect(t.sizeBAD).toBe(1);
    expect(theoryAt(AXELROD, 2 / 3).verdicts.tftNash).toBe(true);
    expect(theoryAt(AXELROD, 0.6).verdicts.riskDominant).toBe(true);
  });
});

describe('the tie δ = δ_RD (issue 10)', () => {
  // Source: Axelrod's payoffs (1984, p. 8), δ_RD = 3/5 (methods.md §1 check values). At δ = δ_RD the
  // closed form of sizeBAD is exactly ½ [calc: with δ = (T−R+P−S)/(T−S), numerator and denominator
  // times (T−S) are (R−P)(P−S) and 2(R−P)(P−S)]. 0.6 and 3/5 are the same double.
  it('sizeBAD is exactly ½ and both verdicts name the tie', () => {
    for (const delta of [0.6, 3 / 5, riskDominance(AXELROD)]) {
      const t = theoryAt(AXELROD, delta);
      expect(t.sizeBAD).toBe(0.5);
      expect(t.verdicts.basin).toBe('tie');
      // the weak condition of methods.md §1 (δ ≥ δ_RD) still holds at the boundary
      expect(t.verdicts.riskDominant).toBe(true);
      expect(basinWords(t.verdicts.basin)).toBe('exactly ½: neither favoured');
    }
  });

  it('on either side, the risk-dominance verdict and sizeBAD’s side of ½ agree', () => {
    expect(theoryAt(AXELROD, 0.6001).verdicts.basin).toBe('cooperation');
    expect(theoryAt(AXELROD, 0.6001).sizeBAD).toBeLessThan(0.5);
    expect(theoryAt(AXELROD, 0.5999).verdicts.basin).toBe('defection');
    expect(theoryAt(AXELROD, 0.5999).sizeBAD).toBeGreaterThan(0.5);
    expect(theoryAt(AXELROD, 0.5999).verdicts.riskDominant).toBe(false);
  });

  it('for random games the one comparison decides both, ties included', () => {
    fc.assert(
      fc.property(arbGame, arbDelta, (game, delta) => {
        for (const d of [delta, riskDominance(game)]) {
          const t = theoryAt(game, d);
          const side = t.sizeBAD < 0.5 ? 'cooperation' : t.sizeBAD > 0.5 ? 'defection' : 'tie';
          expect(side).toBe(t.verdicts.basin);
          expect(t.verdicts.riskDominant).toBe(t.verdicts.basin !== 'defection');
        }
      }),
    );
  });
});
