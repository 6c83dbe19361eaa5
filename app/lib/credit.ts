/**
 * Points → credit by the design's rule (product.md, "Data": the credit sheet). Pure.
 *
 * - participation: the full credit for taking part, or — with `pointsScaleMax` — the credit scaled
 *   by points / pointsScaleMax (capped at the full credit), to two decimals.
 * - paid: show-up fee + points × rate, rounded UP to a multiple of the rounding step so nobody is
 *   short-changed. Points below zero earn nothing: nobody loses real money (methods.md §8).
 *
 * Money is computed in integers (10⁻¹⁰ units, BigInt) so that 0.1 + 0.2 rounds up to 0.30 and not
 * to 0.31 as binary fractions would.
 */
import type { CreditRule } from './design';

export type Credit = { kind: 'participation'; credit: number } | { kind: 'paid'; payout: number; currency: string; decimals: number };

const SCALE = 10n ** 10n;

/** x × 10^digits as an integer (the rules' numbers have at most a handful of decimals). */
const fixed = (x: number, digits: number) => BigInt(Math.round(x * 10 ** digits));

function decimalsOf(step: number): number {
  const s = String(step);
  if (s.includes('e-')) return Number(s.split('e-')[1]);
  return s.includes('.') ? s.split('.')[1].length : 0;
}

/** Payout of a paid session: fee + max(points, 0) × rate, rounded up to the step. */
export function paidAmount(showUpFee: number, ratePerPoint: number, points: number, rounding: number): number {
  const fee = fixed(showUpFee, 6) * 10n ** 4n; // 10⁻¹⁰ units
  const earned = fixed(Math.max(points, 0), 4) * fixed(ratePerPoint, 6); // 10⁻⁴ × 10⁻⁶ = 10⁻¹⁰ units
  const step = fixed(rounding, 6) * 10n ** 4n;
  if (step <= 0n) throw new RangeError(`The rounding step must be above 0, got ${rounding}`);
  const total = fee + earned;
  const up = ((total + step - 1n) / step) * step;
  const whole = up / SCALE;
  const frac = up % SCALE;
  return Number(whole) + Number(frac) / Number(SCALE);
}

/** Participation credit, optionally scaled by points (to two decimals, halves up). */
export function participationCredit(credit: number, points: number, pointsScaleMax?: number): number {
  if (pointsScaleMax === undefined) return credit;
  const share = Math.min(Math.max(points, 0), pointsScaleMax) / pointsScaleMax;
  return Math.round(credit * share * 100 + 1e-9) / 100;
}

export function creditFor(rule: CreditRule, points: number): Credit {
  if (rule.kind === 'participation')
    return { kind: 'participation', credit: participationCredit(rule.credit, points, rule.pointsScaleMax) };
  return {
    kind: 'paid',
    payout: paidAmount(rule.showUpFee, rule.ratePerPoint, points, rule.rounding),
    currency: rule.currency,
    decimals: Math.max(2, decimalsOf(rule.rounding)),
  };
}

/** The rule in words, for the sheet's page and the results e-mail. */
export function describeCreditRule(rule: CreditRule): string {
  if (rule.kind === 'participation') {
    return rule.pointsScaleMax === undefined
      ? `${rule.credit} credit for taking part`
      : `up to ${rule.credit} credit: points ÷ ${rule.pointsScaleMax} × ${rule.credit}, capped at ${rule.credit}`;
  }
  return `${rule.showUpFee} ${rule.currency} show-up fee + points × ${rule.ratePerPoint} ${rule.currency}, rounded up to a multiple of ${rule.rounding}`;
}

export function formatCredit(c: Credit): string {
  return c.kind === 'participation' ? String(c.credit) : `${c.payout.toFixed(c.decimals)} ${c.currency}`;
}
