import { describe, expect, it } from 'vitest';
import { DEFAULT_LABELS, type DesignInput, designSchema, designWarnings } from '#app/lib/design';

const base: DesignInput = {
  payoffs: { R: 3, S: 0, T: 5, P: 1 }, // Axelrod (1984, p. 8) payoffs, methods.md §1
  delta: 0.75,
  supergames: 10,
  roundSeconds: 30,
};

/** field path → messages, as a form would show them */
function fieldErrors(input: unknown): Record<string, string[]> {
  const r = designSchema.safeParse(input);
  if (r.success) return {};
  const out: Record<string, string[]> = {};
  for (const issue of r.error.issues) (out[issue.path.join('.')] ??= []).push(issue.message);
  return out;
}

describe('design schema', () => {
  it('fills neutral defaults', () => {
    const d = designSchema.parse(base);
    expect(d.labels).toEqual(DEFAULT_LABELS);
    expect(d.labels).toEqual({ C: 'X', D: 'Y' });
    expect(d.termination).toEqual({ kind: 'standard' });
    expect(d.matching).toBe('random-rematch');
    expect(d.oddCount).toEqual({ kind: 'computer', strategy: 'TFT' });
    expect(d.timeout).toBe('repeat-last');
    expect(d.consent).toBe(false);
  });

  it('needs T > R > P > S, with the message on the field to fix (methods.md §0)', () => {
    expect(fieldErrors({ ...base, payoffs: { R: 5, S: 0, T: 5, P: 1 } })).toEqual({
      'payoffs.T': ['T (temptation) must be greater than R (reward)'],
    });
    expect(fieldErrors({ ...base, payoffs: { R: 1, S: 0, T: 5, P: 1 } })).toEqual({
      'payoffs.R': ['R (reward) must be greater than P (punishment)'],
    });
    expect(fieldErrors({ ...base, payoffs: { R: 3, S: 2, T: 5, P: 1 } })).toEqual({
      'payoffs.P': ['P (punishment) must be greater than S (sucker)'],
    });
    expect(Object.keys(fieldErrors({ ...base, payoffs: { R: 0, S: 5, T: 0, P: 1 } })).sort()).toEqual([
      'payoffs.P',
      'payoffs.R',
      'payoffs.T',
    ]);
  });

  it('needs 0 < δ < 1', () => {
    expect(fieldErrors({ ...base, delta: 0 })).toEqual({ delta: ['δ must be greater than 0'] });
    expect(fieldErrors({ ...base, delta: 1 })).toEqual({ delta: ['δ must be less than 1'] });
    expect(fieldErrors({ ...base, delta: 'x' })).toEqual({ delta: ['δ must be a number'] });
  });

  it('bounds supergames (1–200), the round timer (5–600 s) and the block size', () => {
    expect(fieldErrors({ ...base, supergames: 0 })).toEqual({ supergames: ['At least 1 supergame'] });
    expect(fieldErrors({ ...base, supergames: 201 })).toEqual({ supergames: ['At most 200 supergames'] });
    expect(fieldErrors({ ...base, supergames: 2.5 })).toEqual({ supergames: ['The number of supergames is a whole number'] });
    expect(fieldErrors({ ...base, roundSeconds: 4 })).toEqual({ roundSeconds: ['The round timer is at least 5 seconds'] });
    expect(fieldErrors({ ...base, roundSeconds: 601 })).toEqual({ roundSeconds: ['The round timer is at most 600 seconds'] });
    expect(fieldErrors({ ...base, termination: { kind: 'block', k: 0 } })).toEqual({ 'termination.k': ['A block has at least 1 round'] });
    expect(designSchema.parse({ ...base, termination: { kind: 'block', k: 5 } }).termination).toEqual({ kind: 'block', k: 5 });
  });

  it('checks strategies, labels, the timeout rule and the credit rule', () => {
    expect(fieldErrors({ ...base, oddCount: { kind: 'computer', strategy: 'Nice' } })).toEqual({
      'oddCount.strategy': ['Choose a strategy from the library'],
    });
    expect(fieldErrors({ ...base, labels: { C: 'X', D: 'X' } })).toEqual({ 'labels.D': ['The two labels must differ'] });
    expect(fieldErrors({ ...base, labels: { C: ' ', D: 'Y' } })).toEqual({ 'labels.C': ['A label cannot be empty'] });
    expect(fieldErrors({ ...base, oddCount: { kind: 'sit-out' }, timeout: 'computer-strategy' })).toHaveProperty('timeout');
    expect(designSchema.safeParse({ ...base, timeout: 'computer-strategy' }).success).toBe(true);
    expect(fieldErrors({ ...base, credit: { kind: 'paid', showUpFee: -1, ratePerPoint: 0.1, currency: 'eur' } })).toEqual({
      'credit.showUpFee': ['The show-up fee cannot be negative'],
      'credit.currency': ['Use a three-letter currency code such as EUR'],
    });
    const paid = designSchema.parse({ ...base, credit: { kind: 'paid', showUpFee: 5, ratePerPoint: 0.02, currency: 'EUR' } });
    expect(paid.credit).toEqual({ kind: 'paid', showUpFee: 5, ratePerPoint: 0.02, currency: 'EUR', rounding: 0.01 });
  });
});

describe('design warnings', () => {
  it('warns when 2R ≤ T + S (methods.md §0: usually 2R > T + S)', () => {
    const d = designSchema.parse({ ...base, payoffs: { R: 3, S: 0, T: 7, P: 1 } });
    expect(designWarnings(d).map((w) => w.path.join('.'))).toEqual(['payoffs.R']);
    expect(designWarnings(designSchema.parse(base))).toEqual([]);
  });

  it('accepts δ = 0.875 (drawn 1–1000, exact) and refuses δ the draw cannot implement exactly', () => {
    // methods.md §8: the announced δ must be the true continuation probability.
    expect(designWarnings(designSchema.parse({ ...base, delta: 0.875 }))).toEqual([]);
    expect(fieldErrors({ ...base, delta: 0.87501 })).toEqual({
      delta: ['Use at most four decimals for δ (e.g. 0.875), so the draw implements it exactly'],
    });
  });
});
