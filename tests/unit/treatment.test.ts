import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { designSchema, type DesignInput } from '#app/lib/design';
import { groupByTreatment, treatmentOf, versionedName } from '#app/lib/treatment';

// Source of the payoffs: Dal Bó & Fréchette (2011), R = 40 at δ = 3/4 (methods.md §1).
const base = (over: Partial<DesignInput> = {}) =>
  designSchema.parse({ payoffs: { R: 40, S: 12, T: 50, P: 25 }, delta: 0.75, supergames: 20, roundSeconds: 20, ...over });

describe('treatmentOf', () => {
  it('reads the parameters that change the theory', () => {
    expect(treatmentOf(base())).toEqual({
      key: 'R=40;S=12;T=50;P=25;delta=0.75;termination=standard;matching=random-rematch',
      label: 'R40 S12 T50 P25, δ = 0.75, random termination',
    });
    expect(treatmentOf(base({ termination: { kind: 'block', k: 5 }, payoffs: { R: 3, S: -1.5, T: 4, P: 0 } })).label).toBe(
      'R3 S−1.5 T4 P0, δ = 0.75, block random termination, blocks of 5',
    );
  });

  it('ignores what does not change the game: labels, timer, supergames, rules for odd counts and timeouts, credit, consent, instructions', () => {
    const a = treatmentOf(base());
    const b = treatmentOf(
      base({
        labels: { C: 'Left', D: 'Right' },
        roundSeconds: 60,
        supergames: 5,
        oddCount: { kind: 'sit-out' },
        timeout: 'defect',
        credit: { kind: 'paid', showUpFee: 5, ratePerPoint: 0.01, currency: 'EUR' },
        consent: true,
        instructions: 'Other words',
      }),
    );
    expect(b).toEqual(a);
  });

  // docs/decisions/028-before-play-is-not-a-treatment.md
  it('ignores the before-play options: a comprehension check, a practice round and templated instructions', () => {
    const plain = base();
    const withPreplay = base({ comprehension: true, practice: true, instructions: 'After each round: another with a chance of {delta%}.' });
    expect(treatmentOf(withPreplay)).toEqual(treatmentOf(plain));
    // A design stored before these options existed reads them as off and keeps its key.
    const stored = designSchema.parse(JSON.parse(JSON.stringify({ ...plain, comprehension: undefined, practice: undefined })));
    expect(stored.comprehension).toBe(false);
    expect(stored.practice).toBe(false);
    expect(treatmentOf(stored).key).toBe('R=40;S=12;T=50;P=25;delta=0.75;termination=standard;matching=random-rematch');
    const g = groupByTreatment([
      { id: 1, name: 'Baseline', design: plain },
      { id: 2, name: 'Baseline', design: withPreplay },
    ]);
    expect(g.ok && g.groups.map((x) => x.sessionIds)).toEqual([[1, 2]]);
  });

  it('tells apart any change of payoffs, δ, termination scheme or block size', () => {
    const k = (d: Partial<DesignInput>) => treatmentOf(base(d)).key;
    const keys = [
      k({}),
      k({ delta: 0.5 }),
      k({ delta: 0.7501 }),
      k({ payoffs: { R: 41, S: 12, T: 50, P: 25 } }),
      k({ payoffs: { R: 40, S: 11, T: 50, P: 25 } }),
      k({ payoffs: { R: 40, S: 12, T: 51, P: 25 } }),
      k({ payoffs: { R: 40, S: 12, T: 50, P: 24 } }),
      k({ termination: { kind: 'block', k: 1 } }),
      k({ termination: { kind: 'block', k: 5 } }),
      k({ termination: { kind: 'block', k: 6 } }),
    ];
    expect(new Set(keys).size).toBe(keys.length);
  });

  it('equal keys ⇔ equal identity fields, for random designs (keys and labels are exact)', () => {
    const payoff = fc.integer({ min: -50, max: 50 }).map((x) => x / 2);
    const arb = fc.record({
      P: payoff,
      a: fc.integer({ min: 1, max: 20 }),
      b: fc.integer({ min: 1, max: 20 }),
      c: fc.integer({ min: 1, max: 20 }),
      delta: fc.integer({ min: 1, max: 9999 }).map((x) => x / 10000),
      k: fc.option(fc.integer({ min: 1, max: 50 }), { nil: undefined }),
    });
    fc.assert(
      fc.property(arb, arb, (x, y) => {
        const d = (v: typeof x) =>
          base({
            payoffs: { P: v.P, S: v.P - v.a, R: v.P + v.b, T: v.P + v.b + v.c },
            delta: v.delta,
            termination: v.k === undefined ? { kind: 'standard' } : { kind: 'block', k: v.k },
          });
        const [dx, dy] = [d(x), d(y)];
        const same = JSON.stringify([dx.payoffs, dx.delta, dx.termination]) === JSON.stringify([dy.payoffs, dy.delta, dy.termination]);
        expect(treatmentOf(dx).key === treatmentOf(dy).key).toBe(same);
        expect(treatmentOf(dx).label === treatmentOf(dy).label).toBe(same);
      }),
    );
  });

  it('names a later version of a design', () => {
    expect(versionedName('Baseline', 1)).toBe('Baseline');
    expect(versionedName('Baseline', 3)).toBe('Baseline (v3)');
  });
});

describe('groupByTreatment', () => {
  const s = (id: number, name: string, over: Partial<DesignInput> = {}) => ({ id, name, design: base(over) });

  it('pools sessions of one treatment whatever their names, and keeps different treatments apart', () => {
    const g = groupByTreatment([s(4, 'Long (v2)'), s(2, 'Short', { delta: 0.5 }), s(3, 'Long')]);
    expect(g.ok).toBe(true);
    if (!g.ok) return;
    expect(g.groups.map((x) => [x.sessionIds, x.names, x.label])).toEqual([
      [[2], ['Short'], 'R40 S12 T50 P25, δ = 0.5, random termination'],
      [[3, 4], ['Long', 'Long (v2)'], 'R40 S12 T50 P25, δ = 0.75, random termination'],
    ]);
    expect(g.groups[1].title).toBe('Long / Long (v2) — R40 S12 T50 P25, δ = 0.75, random termination');
    expect(g.separated).toEqual([]);
  });

  it('refuses to pool sessions that share a name but differ in δ, payoffs or termination', () => {
    for (const over of [{ delta: 0.5 }, { payoffs: { R: 32, S: 12, T: 50, P: 25 } }, { termination: { kind: 'block' as const, k: 4 } }]) {
      const g = groupByTreatment([s(1, 'Baseline'), s(2, 'Baseline', over), s(3, 'Other')]);
      expect(g.ok).toBe(false);
      if (g.ok) return;
      expect(g.conflicts).toHaveLength(1);
      expect(g.conflicts[0].name).toBe('Baseline');
      expect(g.conflicts[0].variants.map((v) => v.sessionIds)).toEqual([[1], [2]]);
      expect(g.message).toContain('Sessions called “Baseline” ran different treatments');
      expect(g.message).toContain('#1: R40 S12 T50 P25, δ = 0.75, random termination');
      expect(g.message).toContain('cannot be pooled');
    }
  });

  it('on request, shows such sessions as separate groups and says which were separated', () => {
    const g = groupByTreatment([s(1, 'Baseline'), s(2, 'Baseline', { delta: 0.5 })], { separate: true });
    expect(g.ok).toBe(true);
    if (!g.ok) return;
    expect(g.groups.map((x) => x.sessionIds)).toEqual([[1], [2]]);
    expect(g.groups.map((x) => x.design.delta)).toEqual([0.75, 0.5]);
    expect(g.separated.map((c) => c.name)).toEqual(['Baseline']);
    expect(new Set(g.groups.map((x) => x.title)).size).toBe(2);
  });
});
