/**
 * A design: the parameter set a session freezes when it opens (product.md, "Vocabulary").
 * Validation follows methods.md §0: a prisoner's dilemma needs T > R > P > S and 0 < δ < 1.
 */
import { z } from 'zod';
import { LIBRARY } from './automata';
import { isImplementable } from './draws';

/**
 * Neutral default labels. "A"/"B" read as grades in a classroom (A is the good one), and
 * "cooperate"/"defect" frame the choice; X and Y carry neither meaning.
 */
export const DEFAULT_LABELS = { C: 'X', D: 'Y' } as const;

const strategyId = z.string().refine((id) => LIBRARY.some((a) => a.id === id), { message: 'Choose a strategy from the library' });

const money = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .finite()
    .min(0, `${what} cannot be negative`);

const label = z.string().trim().min(1, 'A label cannot be empty').max(24, 'Keep labels to 24 characters');

export const payoffsSchema = z
  .object({
    R: z.number({ error: 'R must be a number' }).finite(),
    S: z.number({ error: 'S must be a number' }).finite(),
    T: z.number({ error: 'T must be a number' }).finite(),
    P: z.number({ error: 'P must be a number' }).finite(),
  })
  .superRefine((p, ctx) => {
    // methods.md §0: a prisoner's dilemma needs T > R > P > S; each message sits on the field to fix.
    if (!(p.T > p.R)) {
      ctx.addIssue({ code: 'custom', path: ['T'], message: 'T (temptation) must be greater than R (reward)' });
    }
    if (!(p.R > p.P)) {
      ctx.addIssue({ code: 'custom', path: ['R'], message: 'R (reward) must be greater than P (punishment)' });
    }
    if (!(p.P > p.S)) {
      ctx.addIssue({ code: 'custom', path: ['P'], message: 'P (punishment) must be greater than S (sucker)' });
    }
  });

export const terminationSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('standard') }),
  // Fréchette & Yuksel (2017), block random termination; k = 1 is the standard scheme
  z.object({
    kind: z.literal('block'),
    k: z
      .number()
      .int('The block size is a whole number of rounds')
      .min(1, 'A block has at least 1 round')
      .max(50, 'Keep blocks to 50 rounds or fewer'),
  }),
]);

/** The library strategy a computer partner plays where the design names none: tit-for-tat (common practice). */
export const DEFAULT_COMPUTER_STRATEGY = 'TFT';

export const oddCountSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('computer'), strategy: strategyId }),
  z.object({ kind: z.literal('sit-out') }),
]);

export const timeoutRuleSchema = z.enum(['defect', 'cooperate', 'repeat-last', 'computer-strategy']);

export const creditRuleSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('participation'),
    credit: money('Credit'),
    /** points that earn the full credit; without it, taking part earns the full credit */
    pointsScaleMax: z.number().finite().positive('The points for full credit must be above 0').optional(),
  }),
  z.object({
    kind: z.literal('paid'),
    showUpFee: money('The show-up fee'),
    ratePerPoint: money('The rate per point'),
    currency: z.string().regex(/^[A-Z]{3}$/, 'Use a three-letter currency code such as EUR'),
    /** payouts are rounded UP to a multiple of this step, so nobody is short-changed */
    rounding: z.number().finite().positive('The rounding step must be above 0').default(0.01),
  }),
]);

export const designSchema = z
  .object({
    payoffs: payoffsSchema,
    labels: z
      .object({ C: label, D: label })
      .refine((l) => l.C !== l.D, { path: ['D'], message: 'The two labels must differ' })
      .default({ ...DEFAULT_LABELS }),
    delta: z
      .number({ error: 'δ must be a number' })
      .gt(0, 'δ must be greater than 0')
      .lt(1, 'δ must be less than 1')
      // methods.md §8: the announced δ must be the true continuation probability; the draw (1–100,
      // 1–1000 or 1–10000) implements δ exactly only up to four decimals.
      .refine(isImplementable, 'Use at most four decimals for δ (e.g. 0.875), so the draw implements it exactly'),
    supergames: z
      .number()
      .int('The number of supergames is a whole number')
      .min(1, 'At least 1 supergame')
      .max(200, 'At most 200 supergames'),
    roundSeconds: z
      .number()
      .int('The round timer is a whole number of seconds')
      .min(5, 'The round timer is at least 5 seconds')
      .max(600, 'The round timer is at most 600 seconds'),
    termination: terminationSchema.default({ kind: 'standard' }),
    matching: z.literal('random-rematch').default('random-rematch'),
    oddCount: oddCountSchema.default({ kind: 'computer', strategy: DEFAULT_COMPUTER_STRATEGY }),
    timeout: timeoutRuleSchema.default('repeat-last'),
    credit: creditRuleSchema.default({ kind: 'participation', credit: 1 }),
    consent: z.boolean().default(false),
    /** before play: questions on the payoff table and the draw rule, answered correctly before the lobby */
    comprehension: z.boolean().default(false),
    /** before play: a practice supergame against the computer, on the phone only, never stored */
    practice: z.boolean().default(false),
    instructions: z.string().max(20_000, 'Keep the instructions under 20,000 characters').default(''),
  })
  .superRefine((d, ctx) => {
    if (d.timeout === 'computer-strategy' && d.oddCount.kind !== 'computer') {
      ctx.addIssue({
        code: 'custom',
        path: ['timeout'],
        message: 'This timeout rule plays the computer partner’s strategy; choose a computer partner for odd counts, or another rule',
      });
    }
  });

/** A validated design (all defaults filled in). */
export type Design = z.output<typeof designSchema>;
/** What a form or an API may send (defaults optional). */
export type DesignInput = z.input<typeof designSchema>;
export type Payoffs = Design['payoffs'];
export type TimeoutRule = z.output<typeof timeoutRuleSchema>;
export type OddCountRule = z.output<typeof oddCountSchema>;

/**
 * The strategy of the design's computer partner (the odd participant's partner, a seat handed to
 * the computer, the practice partner): its odd-count rule's, or the default where it has none.
 */
export function computerStrategyOf(d: { oddCount: OddCountRule }): string {
  return d.oddCount.kind === 'computer' ? d.oddCount.strategy : DEFAULT_COMPUTER_STRATEGY;
}
export type CreditRule = z.output<typeof creditRuleSchema>;

export interface DesignWarning {
  path: (string | number)[];
  message: string;
}

/** Warnings that do not block saving (product.md, "Design"). */
export function designWarnings(d: Design): DesignWarning[] {
  const out: DesignWarning[] = [];
  const { R, S, T } = d.payoffs;
  if (2 * R <= T + S) {
    // methods.md §0: usually 2R > T + S, else taking turns at C and D beats mutual cooperation
    out.push({
      path: ['payoffs', 'R'],
      message: `2R (${2 * R}) is not above T + S (${T + S}): taking turns at ${d.labels.C}/${d.labels.D} pays at least as much as both choosing ${d.labels.C}`,
    });
  }
  return out;
}
