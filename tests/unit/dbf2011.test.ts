/**
 * Outside checks on a real panel: Dal Bó & Fréchette (2011), shared/data/dbf2011/choices.csv,
 * run through the CLI's own path (panel-csv → window → strategy set → SFEM).
 */
import { readFileSync } from 'node:fs';
import chi2gof from '@stdlib/stats-chi2gof';
import jstat from 'jstat';
import { beforeAll, describe, expect, it } from 'vitest';
import { geometricLengthGof } from '#app/lib/gof';
import { parseWindow, selectWindow, groupPanel, countChoices } from '#app/lib/panel';
import type { Panel } from '#app/lib/panel';
import { estimateFromCsv, parseColumnMap, readChoiceCsv } from '#app/lib/panel-csv';
import type { CsvEstimation } from '#app/lib/panel-csv';
import { bootstrap } from '#app/lib/sfem';

const FILE = new URL('../../../shared/data/dbf2011/choices.csv', import.meta.url);
// The CLI's mapping for this file: --map subject=subject --map action=cooperate --map partner_action=partner_cooperate
const MAP = ['subject=subject', 'action=cooperate', 'partner_action=partner_cooperate'];

let csv = '';
let run: CsvEstimation;
let panel: Panel;
beforeAll(() => {
  csv = readFileSync(FILE, 'utf8');
  run = estimateFromCsv(csv, { map: MAP, by: 'treatment', window: 'after-rounds:110', strategies: 'ALLD,ALLC,Grim,TFT,WSLS,T2' });
  panel = readChoiceCsv(csv, parseColumnMap(MAP)).panel;
});
const group = (name: string) => {
  const g = run.groups.find((x) => x.group === name);
  if (!g) throw new Error(`no group ${name}`);
  return g;
};
const share = (name: string, id: string) => {
  const e = group(name).estimate;
  return e.shares[e.strategies.indexOf(id)];
};

describe('the panel', () => {
  it('reads all 37,042 rows of 266 subjects in 18 sessions without error', () => {
    // Source: shared/data/dbf2011/README.md
    expect(run.errors).toEqual([]);
    expect(panel.subjects).toHaveLength(266);
    expect(new Set(panel.supergames.map((g) => g.session)).size).toBe(18);
    expect(countChoices(panel)).toBe(37042);
  });

  it('"start after 110 rounds" means rounds already played ≥ 110', () => {
    // Source: Dal Bó & Fréchette (2011), Table 7: N = 44 for D5R32 and D75R48; choices 832 and
    // 1,396 as in methods.md §5. The six treatments' windows together hold 7,358 choices, the row
    // count of stratEst's data.DF2011 (the same window, stratEst documentation).
    const counts = (w: string) =>
      Object.fromEntries(
        groupPanel(selectWindow(panel, parseWindow(w)), 'treatment').map((g) => [
          g.group,
          [g.panel.subjects.length, countChoices(g.panel)],
        ]),
      );
    const ge = counts('after-rounds:110');
    expect(ge.D5R32).toEqual([44, 832]);
    expect(ge.D75R48).toEqual([44, 1396]);
    expect(Object.values(ge).reduce((s, [, n]) => s + n, 0)).toBe(7358);
    // the strict reading ("> 110", i.e. ≥ 111) does not reproduce the paper
    const gt = counts('after-rounds:111');
    expect(gt.D5R32[1]).not.toBe(832);
    expect(gt.D75R48[1]).not.toBe(1396);
  });
});

describe('SFEM on the window of Dal Bó & Fréchette (2011)', () => {
  it('D5R32: N 44, 832 choices, ALLD 0.9196, TFT 0.0804, β 0.9405, γ 0.3623, ln L −199.1452', () => {
    // Source: Dal Bó & Fréchette (2011), Table 7 for shares; ln L and β: methods.md §5 [calc].
    const e = group('D5R32').estimate;
    expect([e.subjects, e.choices]).toEqual([44, 832]);
    expect(share('D5R32', 'ALLD')).toBeCloseTo(0.9196, 4);
    expect(share('D5R32', 'TFT')).toBeCloseTo(0.0804, 4);
    for (const id of ['ALLC', 'Grim', 'WSLS', 'T2']) expect(share('D5R32', id)).toBeCloseTo(0, 4);
    expect(e.beta).toBeCloseTo(0.9405, 4);
    expect(e.gamma).toBeCloseTo(0.3623, 4);
    expect(e.errorProbability).toBeCloseTo(0.0595, 4);
    expect(e.logLik).toBeCloseTo(-199.1452, 3);
  });

  it('D75R48: N 44, 1,396 choices, ALLC 0.0789, Grim 0.1158, TFT 0.5613, T2 0.2439, β 0.9704, ln L −198.2304', () => {
    // Source: Dal Bó & Fréchette (2011), Table 7 for shares; ln L and β: methods.md §5 [calc].
    const e = group('D75R48').estimate;
    expect([e.subjects, e.choices]).toEqual([44, 1396]);
    expect(share('D75R48', 'ALLC')).toBeCloseTo(0.0789, 4);
    expect(share('D75R48', 'Grim')).toBeCloseTo(0.1158, 4);
    expect(share('D75R48', 'TFT')).toBeCloseTo(0.5613, 4);
    expect(share('D75R48', 'T2')).toBeCloseTo(0.2439, 4);
    expect(share('D75R48', 'ALLD')).toBeCloseTo(0, 4);
    expect(share('D75R48', 'WSLS')).toBeCloseTo(0, 4);
    expect(e.beta).toBeCloseTo(0.9704, 4);
    expect(e.logLik).toBeCloseTo(-198.2304, 3);
  });

  it('bootstrap D5R32, B = 1000, seed 1: SD(φ_ALLD) ≈ 0.04 and SD(β) ≈ 0.02 (±0.01)', () => {
    // Source: methods.md §5 bootstrap check [calc] (seed-dependent; tolerance ±0.01).
    const g = group('D5R32');
    const b = bootstrap(g.table, g.estimate, 1000, 1);
    expect(b.B).toBe(1000);
    expect(Math.abs(b.sdShares[g.estimate.strategies.indexOf('ALLD')] - 0.04)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(b.sdBeta - 0.02)).toBeLessThanOrEqual(0.01);
  });
});

describe('realised supergame lengths against the geometric law (methods.md §2)', () => {
  // δ from the treatment name: D5… = 1/2, D75… = 3/4 (shared/data/dbf2011/README.md).
  const lengths = (prefix: string) => panel.supergames.filter((g) => g.treatment.startsWith(prefix)).map((g) => g.length);

  it('δ = 3/4 sessions: 289 supergames, bins 1…9, 10+: χ² 9.310, df 9, p 0.409', () => {
    // Source: methods.md §2 check [calc; identical with @stdlib/stats-chi2gof, jStat and scipy].
    const r = geometricLengthGof(lengths('D75'), 0.75);
    expect(r.n).toBe(289);
    expect(r.bins.map((b) => b.from)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
    expect(r.bins[9].to).toBeNull();
    expect(r.statistic).toBeCloseTo(9.31, 3);
    expect(r.df).toBe(9);
    expect(r.pValue).toBeCloseTo(0.409, 3);
    expect(Math.abs(r.pValue - (1 - jstat.jStat.chisquare.cdf(r.statistic, r.df)))).toBeLessThan(1e-10);
    const ref = chi2gof(
      r.bins.map((b) => b.observed),
      r.bins.map((b) => b.expected / r.n),
    );
    expect(ref.statistic).toBeCloseTo(r.statistic, 10);
    expect(ref.pValue).toBeCloseTo(r.pValue, 10);
  });

  it('δ = 1/2 sessions: 630 supergames, bins 1…5, 6+: χ² 10.648, df 5, p 0.059', () => {
    // Source: methods.md §2 check [calc; identical with @stdlib/stats-chi2gof, jStat and scipy].
    const r = geometricLengthGof(lengths('D5R'), 0.5);
    expect(r.n).toBe(630);
    expect(r.bins.map((b) => b.from)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(r.statistic).toBeCloseTo(10.648, 3);
    expect(r.df).toBe(5);
    expect(r.pValue).toBeCloseTo(0.059, 3);
    expect(Math.abs(r.pValue - (1 - jstat.jStat.chisquare.cdf(r.statistic, r.df)))).toBeLessThan(1e-10);
    const ref = chi2gof(
      r.bins.map((b) => b.observed),
      r.bins.map((b) => b.expected / r.n),
    );
    expect(ref.statistic).toBeCloseTo(r.statistic, 10);
    expect(ref.pValue).toBeCloseTo(r.pValue, 10);
  });
});
