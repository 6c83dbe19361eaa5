import { describe, expect, it } from 'vitest';
import { posteriorCounts } from '#app/lib/sfem';

describe('posteriorCounts', () => {
  it('counts each subject under its most likely strategy and sums the posteriors', () => {
    // Worked by hand: three subjects, strategies (AD, TFT, GRIM).
    //   s1 (0.7, 0.2, 0.1) → AD;  s2 (0.1, 0.45, 0.45) → TFT (a tie goes to the earlier strategy);
    //   s3 (0, 0.3, 0.7) → GRIM.  Expected: AD 0.8, TFT 0.95, GRIM 1.25 (sums to 3 subjects).
    const { assigned, expected } = posteriorCounts(
      [{ probabilities: [0.7, 0.2, 0.1] }, { probabilities: [0.1, 0.45, 0.45] }, { probabilities: [0, 0.3, 0.7] }],
      3,
    );
    expect(assigned).toEqual([1, 1, 1]);
    expect(expected[0]).toBeCloseTo(0.8, 12);
    expect(expected[1]).toBeCloseTo(0.95, 12);
    expect(expected[2]).toBeCloseTo(1.25, 12);
  });

  it('gives zeros for strategies nobody uses and nothing for no subjects', () => {
    expect(posteriorCounts([{ probabilities: [0, 1] }, { probabilities: [0.2, 0.8] }], 2).assigned).toEqual([0, 2]);
    expect(posteriorCounts([], 2)).toEqual({ assigned: [0, 0], expected: [0, 0] });
  });
});
