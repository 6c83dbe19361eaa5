import { describe, expect, it } from 'vitest';
import { creditFor, paidAmount, participationCredit } from '#app/lib/credit';

// Hand-computed examples (the arithmetic is written out beside each; the rule is the design's:
// show-up fee + points × rate, rounded UP to the rounding step — common practice, so nobody is
// short-changed).
describe('paid sessions: fee + points × rate, rounded up to the step', () => {
  it('rounds up to the step, and an exact multiple stays as it is', () => {
    // 5 + 1234 × 0.02 = 5 + 24.68 = 29.68 → next multiple of 0.50 is 30.00
    expect(paidAmount(5, 0.02, 1234, 0.5)).toBe(30);
    // 29.68 → next multiple of 0.25 is 29.75
    expect(paidAmount(5, 0.02, 1234, 0.25)).toBe(29.75);
    // 29.68 is already a multiple of 0.01
    expect(paidAmount(5, 0.02, 1234, 0.01)).toBe(29.68);
    // 10 + 1500 × 0.01 = 25.00, a multiple of 0.05: not pushed to 25.05
    expect(paidAmount(10, 0.01, 1500, 0.05)).toBe(25);
    // 4 + 777 × 0.0125 = 4 + 9.7125 = 13.7125 → 13.80 (step 0.10)
    expect(paidAmount(4, 0.0125, 777, 0.1)).toBe(13.8);
    // 3 + 41 × 0.07 = 3 + 2.87 = 5.87 → 6 (step 1)
    expect(paidAmount(3, 0.07, 41, 1)).toBe(6);
  });

  it('does not let binary fractions push a payout a step too far', () => {
    // 0.1 + 1 × 0.2 = 0.30 exactly; in floating point 0.1 + 0.2 = 0.30000000000000004, which a
    // naive ceil to 0.01 would turn into 0.31.
    expect(paidAmount(0.1, 0.2, 1, 0.01)).toBe(0.3);
    // 0.7 + 10 × 0.01 = 0.80; 0.7 + 0.1 = 0.7999999999999999 in floating point
    expect(paidAmount(0.7, 0.01, 10, 0.05)).toBe(0.8);
  });

  it('never takes money away: negative points earn nothing, the show-up fee stays', () => {
    // 5 + max(−20, 0) × 0.02 = 5.00
    expect(paidAmount(5, 0.02, -20, 0.5)).toBe(5);
  });

  it('creditFor carries the currency and the decimals to print', () => {
    const rule = { kind: 'paid', showUpFee: 5, ratePerPoint: 0.02, currency: 'EUR', rounding: 0.5 } as const;
    expect(creditFor(rule, 1234)).toEqual({ kind: 'paid', payout: 30, currency: 'EUR', decimals: 2 });
    expect(creditFor({ ...rule, rounding: 0.001 }, 1234)).toEqual({ kind: 'paid', payout: 29.68, currency: 'EUR', decimals: 3 });
  });
});

describe('participation credit', () => {
  it('gives the full credit for taking part, or scales it by points up to pointsScaleMax', () => {
    expect(participationCredit(1, 0)).toBe(1);
    // 2 × 1234 / 2000 = 1.234 → 1.23
    expect(participationCredit(2, 1234, 2000)).toBe(1.23);
    // 2 × 1235 / 2000 = 1.235 → 1.24 (halves up)
    expect(participationCredit(2, 1235, 2000)).toBe(1.24);
    // capped at the full credit
    expect(participationCredit(2, 2500, 2000)).toBe(2);
    expect(participationCredit(2, -5, 2000)).toBe(0);
    expect(creditFor({ kind: 'participation', credit: 2, pointsScaleMax: 2000 }, 1000)).toEqual({ kind: 'participation', credit: 1 });
  });
});
