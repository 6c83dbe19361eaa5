import { describe, expect, it } from 'vitest';
import { checkStageGame, normalised, payoffTable, stagePayoff } from '#app/lib/stage-game';

describe('checkStageGame', () => {
  it("accepts Axelrod's payoffs and δ in (0,1)", () => {
    // Source: Axelrod (1984), p. 8 — T=5, R=3, P=1, S=0 (methods.md §1).
    expect(checkStageGame({ T: 5, R: 3, P: 1, S: 0 }, 0.9).errors).toEqual([]);
    // Source: Dal Bó & Fréchette (2011) payoffs T=50, S=12, P=25, R=48: no error, no warning.
    expect(checkStageGame({ T: 50, R: 48, P: 25, S: 12 }, 0.75)).toEqual({ errors: [], warnings: [] });
  });

  it('accepts negative and decimal payoffs', () => {
    // Source: methods.md §1, R=2, T=3, S=−1, P=0 (Mailath & Samuelson's example, mem).
    expect(checkStageGame({ T: 3, R: 2, P: 0, S: -1 }).errors).toEqual([]);
    expect(checkStageGame({ T: 1.5, R: 1.25, P: 0.5, S: -0.75 }).errors).toEqual([]);
  });

  it('rejects each broken ordering of T > R > P > S with the field named', () => {
    // Source: methods.md §0 — a prisoner's dilemma needs T > R > P > S.
    expect(checkStageGame({ T: 3, R: 3, P: 1, S: 0 }).errors.map((e) => e.field)).toEqual(['T']);
    expect(checkStageGame({ T: 5, R: 1, P: 1, S: 0 }).errors.map((e) => e.field)).toEqual(['R']);
    expect(checkStageGame({ T: 5, R: 3, P: 0, S: 0 }).errors.map((e) => e.field)).toEqual(['P']);
    const e = checkStageGame({ T: 0, R: 1, P: 2, S: 3 }).errors;
    expect(e.map((x) => x.field)).toEqual(['T', 'R', 'P']);
    expect(e[0].message).toContain('T (0) must be greater than R (1)');
  });

  it('rejects non-finite numbers and skips the ordering checks then', () => {
    const r = checkStageGame({ T: Number.NaN, R: 3, P: Infinity, S: 0 });
    expect(r.errors).toEqual([
      { field: 'T', message: 'T must be a finite number.' },
      { field: 'P', message: 'P must be a finite number.' },
    ]);
    expect(r.warnings).toEqual([]);
  });

  it('rejects δ outside the open interval (0,1)', () => {
    for (const d of [0, 1, -0.2, 1.5]) {
      expect(checkStageGame({ T: 5, R: 3, P: 1, S: 0 }, d).errors).toEqual([
        { field: 'delta', message: 'δ must lie strictly between 0 and 1.' },
      ]);
    }
    expect(checkStageGame({ T: 5, R: 3, P: 1, S: 0 }, Number.NaN).errors[0].message).toBe('δ must be a finite number.');
  });

  it('warns (does not block) when 2R ≤ T+S and when 2R ≤ T+P', () => {
    // Source: methods.md §0 ("usually also 2R > T + S") and §1 (WSLS needs 2R > T + P).
    const both = checkStageGame({ T: 6, R: 3, P: 1, S: 0 }, 0.5);
    expect(both.errors).toEqual([]);
    expect(both.warnings.map((w) => w.message)).toEqual([
      '2R (6) ≤ T + S (6): alternating C/D beats mutual cooperation, so tit-for-tat is never a Nash equilibrium.',
      '2R (6) ≤ T + P (7): win-stay lose-shift is never subgame perfect.',
    ]);
    // Axelrod's payoffs: 2R = 6 = T + P, so only the WSLS warning (methods.md §1: WSLS never SPE, g = 1).
    expect(checkStageGame({ T: 5, R: 3, P: 1, S: 0 }).warnings.map((w) => w.message)).toEqual([
      '2R (6) ≤ T + P (6): win-stay lose-shift is never subgame perfect.',
    ]);
  });
});

describe('normalised and payoffs', () => {
  it('g = (T−R)/(R−P), l = (P−S)/(R−P)', () => {
    // Source: methods.md §0; Axelrod's payoffs give g = 1 (methods.md §1), l = 1/2 [calc].
    expect(normalised({ T: 5, R: 3, P: 1, S: 0 })).toEqual({ g: 1, l: 0.5 });
  });

  it('u(C,C)=R, u(C,D)=S, u(D,C)=T, u(D,D)=P', () => {
    // Source: methods.md §0.
    const g = { T: 5, R: 3, P: 1, S: 0 };
    expect([stagePayoff(g, 'C', 'C'), stagePayoff(g, 'C', 'D'), stagePayoff(g, 'D', 'C'), stagePayoff(g, 'D', 'D')]).toEqual([3, 0, 5, 1]);
    expect(Array.from(payoffTable(g))).toEqual([3, 0, 5, 1]);
  });
});
