import fc from 'fast-check';
import fmin from 'fmin';
import { describe, expect, it } from 'vitest';
import { STRATEGY_SETS, libraryStrategy } from '#app/lib/automata';
import type { Action } from '#app/lib/automata';
import { buildPanel } from '#app/lib/panel';
import type { SubjectHistory } from '#app/lib/panel';
import { betaOf, countsTable, estimate, gammaOf, logLikelihood, posteriors, runEm } from '#app/lib/sfem';
import type { CountsTable } from '#app/lib/sfem';
import { simulatePanel } from '#app/lib/simulate-panel';

const acts = (s: string) => s.split('') as Action[];
const subject = (own: string, partner: string, id = 'P-1'): SubjectHistory => ({
  session: 'S',
  treatment: 'T',
  subject: id,
  supergames: [{ supergame: 1, own: acts(own), partner: acts(partner) }],
});

describe('methods.md §5 toy check', () => {
  // Source: methods.md §5 toy check [calc] from the SFEM likelihood of Dal Bó & Fréchette (2011):
  // one subject, one supergame; own C,C,D; partner C,D,D.
  const toy = [subject('CCD', 'CDD')];

  it('counts the matches of each strategy given the observed history', () => {
    const ids = ['ALLD', 'ALLC', 'Grim', 'TFT', 'WSLS', 'T2', 'STFT'];
    const table = countsTable(toy, ids.map(libraryStrategy));
    expect(table.matches.map((m) => m[0])).toEqual([1, 2, 3, 3, 3, 3, 2]);
    expect(table.choices[0]).toBe(3);
  });

  it('ln L = −0.949331 and the posteriors at β = 0.9, φ uniform on {ALLD, ALLC, Grim, TFT}', () => {
    const table = countsTable(toy, ['ALLD', 'ALLC', 'Grim', 'TFT'].map(libraryStrategy));
    const phi = [0.25, 0.25, 0.25, 0.25];
    expect(logLikelihood(table, phi, 0.9)).toBeCloseTo(-0.949331, 6);
    const [post] = posteriors(table, phi, 0.9);
    expect(post[0]).toBeCloseTo(0.005814, 6); // ALLD
    expect(post[1]).toBeCloseTo(0.052326, 6); // ALLC
    expect(post[2]).toBeCloseTo(0.47093, 6); // Grim
    expect(post[3]).toBeCloseTo(0.47093, 6); // TFT
  });

  it('γ(0.9) = 0.455120 and β(γ) inverts it', () => {
    expect(gammaOf(0.9)).toBeCloseTo(0.45512, 6);
    expect(betaOf(gammaOf(0.9))).toBeCloseTo(0.9, 12);
    expect(gammaOf(0.5)).toBe(Infinity);
  });
});

/** Nelder–Mead (fmin 0.0.2) on −ln L over softmax shares and logit β, restarted until it settles. */
function nelderMeadLogLik(table: CountsTable): number {
  const K = table.strategies.length;
  const f = (x: number[]) => {
    const z = [...x.slice(0, K - 1), 0];
    const m = Math.max(...z);
    const e = z.map((v) => Math.exp(v - m));
    const s = e.reduce((a, b) => a + b, 0);
    return -logLikelihood(
      table,
      e.map((v) => v / s),
      1 / (1 + Math.exp(-x[K - 1])),
    );
  };
  let x = [...Array<number>(K - 1).fill(0), 1];
  let best = Infinity;
  for (let run = 0; run < 100; run++) {
    const r = fmin.nelderMead(f, x, {
      maxIterations: 10_000,
      minErrorDelta: 1e-13,
      minTolerance: 1e-10,
      nonZeroDelta: 1.2,
      zeroDelta: 0.5,
    });
    x = r.x;
    const gain = best - r.fx;
    best = Math.min(best, r.fx);
    if (gain < 1e-10) break;
  }
  return -best;
}

describe('estimation', () => {
  it('recovers a stated mixture from 1,000 simulated subjects (shares ±0.05, β ±0.01)', () => {
    // Source: consistency of maximum likelihood (common practice); the mixture and β = 0.9 are ours.
    const ids = STRATEGY_SETS.dbf2011; // ALLD, ALLC, Grim, TFT, WSLS, T2
    const truth = [0.35, 0.1, 0.15, 0.25, 0.1, 0.05];
    const strategies = ids.map(libraryStrategy);
    const sim = simulatePanel({ strategies, shares: truth, beta: 0.9, subjects: 1000, supergames: 20, delta: 0.75, seed: 7 });
    const { panel, errors } = buildPanel(sim.rows);
    expect(errors).toEqual([]);
    const est = estimate(countsTable(panel.subjects, strategies));
    est.shares.forEach((s, k) => expect(Math.abs(s - truth[k]), ids[k]).toBeLessThan(0.05));
    expect(Math.abs(est.beta - 0.9)).toBeLessThan(0.01);
    expect(est.subjects).toBe(1000);
    expect(est.parameters).toBe(6);
    expect(est.aic).toBeCloseTo(-2 * est.logLik + 12, 9);
    expect(est.bic).toBeCloseTo(-2 * est.logLik + 6 * Math.log(1000), 9);
    // posteriors classify most subjects to the strategy they were given
    const hits = est.posteriors.filter(({ subject: s, probabilities: p }) => {
      const top = p.indexOf(Math.max(...p));
      return ids[top] === sim.truth.get(s.split('/')[1]);
    }).length;
    expect(hits / 1000).toBeGreaterThan(0.8);
  });

  it('reaches the same ln L as an independent optimizer (fmin 0.0.2 Nelder–Mead) within 1e-6', () => {
    // Source: methods.md §7, fmin 0.0.2 nelderMead as the independent reference.
    const ids = ['ALLD', 'ALLC', 'Grim', 'TFT'];
    const strategies = ids.map(libraryStrategy);
    const sim = simulatePanel({ strategies, shares: [0.3, 0.2, 0.2, 0.3], beta: 0.85, subjects: 40, supergames: 8, delta: 0.75, seed: 3 });
    const table = countsTable(buildPanel(sim.rows).panel.subjects, strategies);
    const em = estimate(table);
    expect(em.converged).toBe(true);
    expect(Math.abs(nelderMeadLogLik(table) - em.logLik)).toBeLessThan(1e-6);
  });

  it('with no defections only the SUM of the equivalent strategies is identified', () => {
    // Source: methods.md §5, observational equivalence: with no defections Grim, TFT, WSLS, T2 and
    // ALLC prescribe the same; test ln L and the sum of their shares, not each share.
    const subjects = [
      ...Array.from({ length: 30 }, (_, i) => subject('CCCC', 'CCCC', `C${i}`)),
      ...Array.from({ length: 10 }, (_, i) => subject('DDDD', 'DDDD', `D${i}`)),
    ];
    const ids = STRATEGY_SETS.dbf2011;
    const table = countsTable(subjects, ids.map(libraryStrategy));
    const equivalent = ['ALLC', 'Grim', 'TFT', 'WSLS', 'T2'].map((id) => ids.indexOf(id as never));
    const sum = (s: ArrayLike<number>) => equivalent.reduce((a, k) => a + s[k], 0);
    const a = runEm(table, null, [0.5, 0.1, 0.1, 0.1, 0.1, 0.1], 0.8);
    const b = runEm(table, null, [0.5, 0.3, 0.05, 0.05, 0.05, 0.05], 0.8);
    expect(a.logLik).toBeCloseTo(b.logLik, 9);
    expect(sum(a.shares)).toBeCloseTo(0.75, 9);
    expect(sum(b.shares)).toBeCloseTo(0.75, 9);
    // …while the split among them follows the start, not the data
    expect(Math.abs(a.shares[1] - b.shares[1])).toBeGreaterThan(0.1);
  });

  it('EM never lowers ln L, keeps shares on the simplex and beats random parameter points', () => {
    // Source: monotonicity of EM (Dempster, Laird & Rubin 1977) [mem].
    const strategies = STRATEGY_SETS.dbf2011.map(libraryStrategy);
    const sim = simulatePanel({
      strategies,
      shares: [0.4, 0.1, 0.1, 0.2, 0.1, 0.1],
      beta: 0.9,
      subjects: 30,
      supergames: 5,
      delta: 0.75,
      seed: 11,
    });
    const table = countsTable(buildPanel(sim.rows).panel.subjects, strategies);
    const best = estimate(table);
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0.01, max: 1, noNaN: true }), { minLength: 6, maxLength: 6 }),
        fc.double({ min: 0.55, max: 0.99, noNaN: true }),
        fc.integer({ min: 1, max: 30 }),
        (raw, beta, steps) => {
          const total = raw.reduce((s, x) => s + x, 0);
          const start = raw.map((x) => x / total);
          const before = logLikelihood(table, start, beta);
          const r = runEm(table, null, start, beta, { maxIterations: steps });
          expect(r.logLik).toBeGreaterThanOrEqual(before - 1e-9);
          expect(Array.from(r.shares).reduce((s, x) => s + x, 0)).toBeCloseTo(1, 12);
          expect(best.logLik).toBeGreaterThanOrEqual(before - 1e-9);
        },
      ),
      { seed: 5, numRuns: 60 },
    );
  });
});
