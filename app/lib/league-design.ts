/**
 * What a league is set up with and what its run stores, as zod schemas: the design is checked in
 * the create form and again whenever a league row is read (drizzle/schema.ts `leagueDesignJson`),
 * the results whenever they are read (`leagueResultsJson`). Plain module: the browser's form uses
 * the same rules and defaults.
 */
import { z } from 'zod';
import { payoffsSchema } from './design';
import { LEAGUE_MAX_STATES } from './league';
import { strategyFileSchema } from './strategy-file';

/**
 * A league's life: entries are accepted while `open` (and before the deadline); `closed` takes no
 * more; `run` has results the staff see; `published` shows them to the course's participants.
 */
export const LEAGUE_STATES = ['open', 'closed', 'run', 'published'] as const;
export type LeagueState = (typeof LEAGUE_STATES)[number];

/** The run job as the league page polls it. */
export const LEAGUE_RUN_STATUSES = ['none', 'queued', 'running', 'done', 'failed'] as const;
export type LeagueRunStatus = (typeof LEAGUE_RUN_STATUSES)[number];

/** The usual textbook payoffs (Axelrod 1984: R = 3, S = 0, T = 5, P = 1), the form's defaults. */
export const AXELROD_PAYOFFS = { R: 3, S: 0, T: 5, P: 1 } as const;

/** Most entries in one league, house entries included (200 entries solve in < 5 s: npm run bench:league). */
export const LEAGUE_MAX_ENTRIES = 200;
/** Most simulated supergames per pair: the simulated round-robin runs pairs × matches × 1/(1 − δ) rounds. */
export const LEAGUE_MAX_MATCHES = 200;
/** Most generations of the evolution. */
export const LEAGUE_MAX_GENERATIONS = 1000;
/** δ above this makes simulated supergames very long (mean 1/(1 − δ) rounds) for little gain. */
export const LEAGUE_MAX_DELTA = 0.99;
/** Longest entry name (a display name or a team name). */
export const LEAGUE_ENTRY_NAME_MAX = 60;

export const leagueDesignSchema = z.object({
  payoffs: payoffsSchema,
  delta: z
    .number({ error: 'δ must be a number' })
    .gt(0, 'δ must be greater than 0')
    .max(LEAGUE_MAX_DELTA, `δ may be at most ${LEAGUE_MAX_DELTA}`),
  epsilon: z.number({ error: 'ε must be a number' }).min(0, 'ε cannot be negative').max(0.5, 'ε may be at most 0.5'),
  /** simulated supergames per pair, beside the exact values (0: no simulation) */
  matches: z
    .number({ error: 'The number of simulated matches must be a number' })
    .int('The number of simulated matches is a whole number')
    .min(0, 'The number of simulated matches cannot be negative')
    .max(LEAGUE_MAX_MATCHES, `At most ${LEAGUE_MAX_MATCHES} simulated matches per pair`)
    .refine((m) => m !== 1, 'Simulate at least 2 matches per pair (standard errors need two), or 0 for none'),
  generations: z
    .number({ error: 'The number of generations must be a number' })
    .int('The number of generations is a whole number')
    .min(1, 'At least 1 generation')
    .max(LEAGUE_MAX_GENERATIONS, `At most ${LEAGUE_MAX_GENERATIONS} generations`),
  /** seed of the simulated matches (the same seed gives the same simulated results) */
  seed: z.number().int().min(0).max(0xffffffff),
});

export type LeagueDesign = z.output<typeof leagueDesignSchema>;

/** An entry's strategy as stored and exported: the parley-strategy v1 file, within the league's cap. */
export const leagueStrategySchema = strategyFileSchema.refine((f) => f.states.length <= LEAGUE_MAX_STATES, {
  path: ['states'],
  message: `A league entry may have at most ${LEAGUE_MAX_STATES} states.`,
});

const matrix = z.array(z.array(z.number()));

/** One entry as it was when the league ran (later edits do not change published results). */
export const resultEntrySchema = z.object({
  /** league_entries.id at the time of the run */
  entryId: z.number().int(),
  name: z.string(),
  house: z.boolean(),
  strategy: leagueStrategySchema,
});

export const leagueResultsSchema = z.object({
  version: z.literal(1),
  /** the design the numbers were computed with */
  design: leagueDesignSchema,
  entries: z.array(resultEntrySchema),
  /** perRound[i][j]: exact per-round value (1 − δ)·V of entry i against entry j */
  perRound: matrix,
  standings: z.array(z.object({ entry: z.number().int(), score: z.number(), rank: z.number().int() })),
  simulated: z
    .object({
      perRound: matrix,
      standardError: matrix,
      matches: z.number().int(),
      seed: z.number().int(),
      /** each entry's simulated mean per-round score and its standard error */
      scores: z.array(z.object({ score: z.number(), se: z.number() })),
    })
    .nullable(),
  evolution: z.object({ shares: matrix, background: z.number() }),
  survivors: z.array(z.object({ entry: z.number().int(), share: z.number() })),
  computedAt: z.string(),
  /** how long the computation took, in ms */
  ms: z.number(),
});

export type LeagueResults = z.output<typeof leagueResultsSchema>;
export type ResultEntry = z.output<typeof resultEntrySchema>;
