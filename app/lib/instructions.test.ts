import { describe, expect, it } from 'vitest';
import { designSchema } from './design';
import { generateInstructions } from './instructions';

const base = { payoffs: { R: 40, S: 12, T: 50, P: 25 }, delta: 0.75, supergames: 10, roundSeconds: 20 };

describe('instructions generated from a design', () => {
  it('state the payoff table from both sides and the draw rule in plain words', () => {
    const text = generateInstructions(designSchema.parse(base));
    expect(text).toContain('You X, partner Y: you get 12, your partner gets 50.');
    expect(text).toContain('You Y, partner X: you get 50, your partner gets 12.');
    // common practice: continue while draw ≤ 100·δ, announced with the true chance (methods.md §2, §8)
    expect(text).toContain('draws a whole number from 1 to 100');
    expect(text).toContain('If it is 75 or less, you play another round');
    expect(text).toContain('a 75% chance of another round');
    expect(text).toContain('nobody is misled');
  });

  it('use draws from 1 to 1000 for δ = 0.875, so the stated chance is the true one', () => {
    const text = generateInstructions(designSchema.parse({ ...base, delta: 0.875 }));
    expect(text).toContain('from 1 to 1000');
    expect(text).toContain('If it is 875 or less');
    expect(text).toContain('an 87.5% chance');
  });

  it('disclose the computer partner and its rule, in the design’s neutral labels', () => {
    const text = generateInstructions(designSchema.parse({ ...base, labels: { C: 'Blue', D: 'Green' }, oddCount: { kind: 'computer', strategy: 'TFT' } }));
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
