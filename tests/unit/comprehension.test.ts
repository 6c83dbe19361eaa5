import { describe, expect, it } from 'vitest';
import { comprehensionQuestions, gradeAnswers } from '#app/lib/comprehension';
import { designSchema } from '#app/lib/design';

const base = { payoffs: { R: 40, S: 12, T: 50, P: 25 }, delta: 0.75, supergames: 10, roundSeconds: 20 };

describe('comprehension questions generated from a design', () => {
  it('ask the payoff table from both sides, with the answers the table gives', () => {
    const qs = comprehensionQuestions(designSchema.parse({ ...base, labels: { C: 'Blue', D: 'Green' } }));
    const dc = qs.find((q) => q.id === 'points-dc')!;
    expect(dc.text).toBe('If you choose Green and your partner chooses Blue, how many points do you get in that round?');
    // Source: common practice — you defect on a cooperator: T (here 50); you cooperate on a defector: S (here 12).
    expect(dc.answer).toBe('50');
    expect(dc.options.map((o) => o.value)).toEqual(['12', '25', '40', '50']);
    expect(qs.find((q) => q.id === 'points-cd')!.answer).toBe('12');
    expect(qs.map((q) => q.text).join(' ')).not.toMatch(/cooperat|defect/i);
  });

  it('ask the draw rule with δ as the answer, explained with the draw range and cut-off', () => {
    const q = comprehensionQuestions(designSchema.parse({ ...base, delta: 0.875 })).find((x) => x.id === 'draw')!;
    expect(q.options.find((o) => o.value === q.answer)!.label).toBe('87.5%');
    expect(q.options.map((o) => o.label)).toContain('12.5%');
    // Source: common practice (the draw 1–1000 continues while ≤ 875 when 100·δ is not whole)
    expect(q.explanation).toContain('from 1 to 1000');
    expect(q.explanation).toContain('875 or less');
  });

  it('offer 50% once when δ = 0.5', () => {
    const q = comprehensionQuestions(designSchema.parse({ ...base, delta: 0.5 })).find((x) => x.id === 'draw')!;
    expect(q.options.filter((o) => o.label === '50%')).toHaveLength(1);
    expect(q.options.find((o) => o.label === '50%')!.value).toBe(q.answer);
  });

  it('pass only when every answer is right, naming the wrong ones', () => {
    const qs = comprehensionQuestions(designSchema.parse(base));
    expect(gradeAnswers(qs, { 'points-dc': '50', 'points-cd': '12', draw: 'delta' })).toEqual({ passed: true, wrong: [] });
    expect(gradeAnswers(qs, { 'points-dc': '40', 'points-cd': '12' })).toEqual({ passed: false, wrong: ['points-dc', 'draw'] });
  });
});
