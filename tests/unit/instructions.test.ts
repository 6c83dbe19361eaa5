import { describe, expect, it } from 'vitest';
import { designSchema } from '#app/lib/design';
import {
  fillInstructions,
  generateInstructions,
  instructionContradictions,
  instructionProblems,
  instructionsTemplate,
} from '#app/lib/instructions';

const base = { payoffs: { R: 40, S: 12, T: 50, P: 25 }, delta: 0.75, supergames: 10, roundSeconds: 20 };

describe('instructions generated from a design', () => {
  it('state the payoff table from both sides and the draw rule in plain words', () => {
    const text = generateInstructions(designSchema.parse(base));
    expect(text).toContain('You X, partner Y: you get 12, your partner gets 50.');
    expect(text).toContain('You Y, partner X: you get 50, your partner gets 12.');
    // common practice: continue while draw ≤ 100·δ, announced with the true chance (methods.md §2, §8)
    expect(text).toContain('draws a whole number from 1 to 100');
    expect(text).toContain('If it is 75 or less, you play another round');
    expect(text).toContain('the chance of another round is 75%');
    expect(text).toContain('nobody is misled');
  });

  it('use draws from 1 to 1000 for δ = 0.875, so the stated chance is the true one', () => {
    const text = generateInstructions(designSchema.parse({ ...base, delta: 0.875 }));
    expect(text).toContain('from 1 to 1000');
    expect(text).toContain('If it is 875 or less');
    expect(text).toContain('the chance of another round is 87.5%');
  });

  it('disclose the computer partner and its rule, in the design’s neutral labels', () => {
    const text = generateInstructions(
      designSchema.parse({ ...base, labels: { C: 'Blue', D: 'Green' }, oddCount: { kind: 'computer', strategy: 'TFT' } }),
    );
    expect(text).toContain('The computer partner starts with Blue and then copies what you did last round.');
    expect(text).not.toMatch(/TFT|fixed rule/);
    expect(text).toContain('You are always told when your partner is a computer.');
    expect(text).not.toMatch(/cooperat|defect/i);
  });

  it('explain block termination and unpaid rounds', () => {
    const text = generateInstructions(designSchema.parse({ ...base, termination: { kind: 'block', k: 5 } }));
    expect(text).toContain('blocks of 5 rounds');
    expect(text).toContain('do not count for your points');
  });
});

const variants = [
  base,
  { ...base, delta: 0.875 },
  { ...base, delta: 0.7, supergames: 1, termination: { kind: 'block', k: 5 } },
  { ...base, delta: 0.123, oddCount: { kind: 'sit-out' }, timeout: 'defect' },
  { ...base, labels: { C: 'Blue', D: 'Green' }, credit: { kind: 'paid', showUpFee: 5, ratePerPoint: 0.02, currency: 'EUR' } },
  { ...base, payoffs: { R: 3, S: -1.5, T: 4, P: 0 }, credit: { kind: 'participation', credit: 2, pointsScaleMax: 400 }, consent: true },
] as const;

describe('instruction templates', () => {
  it('fill the template of every kind of design to exactly the generated text', () => {
    for (const v of variants) {
      const d = designSchema.parse(v);
      const template = instructionsTemplate(d);
      expect(template).toContain('{delta%}');
      expect(template).not.toMatch(/\d+%/);
      expect(fillInstructions(d, template)).toBe(generateInstructions(d));
    }
  });

  it('follow δ and the payoffs when a template is edited by hand and the parameters change afterwards', () => {
    const text =
      'Each round: both {C} gives you {R}. After each round, another round follows with a chance of {delta%} (a draw from 1 to {drawMax}, {drawCutoff} or less continues).';
    const at75 = designSchema.parse({ ...base, instructions: text });
    expect(fillInstructions(at75)).toBe(
      'Each round: both X gives you 40. After each round, another round follows with a chance of 75% (a draw from 1 to 100, 75 or less continues).',
    );
    const at50 = designSchema.parse({ ...base, delta: 0.5, payoffs: { R: 30, S: 0, T: 50, P: 10 }, instructions: text });
    expect(fillInstructions(at50)).toBe(
      'Each round: both X gives you 30. After each round, another round follows with a chance of 50% (a draw from 1 to 100, 50 or less continues).',
    );
    expect(instructionProblems(at50)).toEqual([]);
  });

  it('find nothing to object to in generated instructions', () => {
    for (const v of variants) {
      const d = designSchema.parse(v);
      expect(instructionContradictions(d, generateInstructions(d))).toEqual([]);
      expect(instructionProblems(d)).toEqual([]);
    }
  });

  it('catch a hand-written 75 % kept after δ changed to 0.5, and every other stale number of the generated text', () => {
    const old = generateInstructions(designSchema.parse({ ...base, delta: 0.75 }));
    const d = designSchema.parse({
      ...base,
      delta: 0.5,
      payoffs: { R: 40, S: 12, T: 60, P: 25 },
      supergames: 12,
      roundSeconds: 30,
      instructions: old,
    });
    const problems = instructionProblems(d);
    expect(problems.some((p) => p.includes('“75%”') && p.includes('δ = 0.5'))).toBe(true);
    expect(problems.some((p) => p.includes('“75 or less”'))).toBe(true);
    expect(problems.some((p) => p.includes('you get 12, your partner gets 50'))).toBe(true);
    expect(problems.some((p) => p.includes('There are 10 supergames'))).toBe(true);
    expect(problems.some((p) => p.includes('20 seconds to choose'))).toBe(true);
    // "75 %" with a space, and δ written as a decimal
    expect(instructionContradictions(d, 'The chance of another round is 75 %.')).toHaveLength(1);
    expect(instructionContradictions(d, 'δ = 0.75 here.')).toHaveLength(1);
    expect(instructionContradictions(d, 'The chance of another round is 50 %; of ending, 50%.')).toEqual([]);
    // a percentage that is not a chance of going on or ending is not checked against δ
    expect(instructionContradictions(d, 'You keep 100% of the points you earn. The chance of another round is 50%.')).toEqual([]);
    expect(instructionContradictions(d, 'Your credit is 10 percent of your points. Then the supergame ends with 75% chance.')).toHaveLength(
      1,
    );
  });

  it('refuse placeholders that are unknown or have no value in the design', () => {
    const d = designSchema.parse({ ...base, instructions: 'Chance {delta%}, blocks of {blockRounds}, {Delta}.' });
    const problems = instructionProblems(d);
    expect(problems).toHaveLength(2);
    expect(problems[0]).toContain('{blockRounds} has no value');
    expect(problems[1]).toContain('{Delta} is not a placeholder');
  });
});
