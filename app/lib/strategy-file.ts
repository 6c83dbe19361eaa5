/**
 * Strategies as files: Parley's own JSON format for an automaton, used by league exports and
 * imports (docs/formats/strategy.md is the reference for people who read or write these files).
 *
 *   {
 *     "format": "parley-strategy", "version": 1,
 *     "id": "TFT", "name": "Tit for tat",
 *     "states": [
 *       { "state": 1, "plays": "C", "next": { "CC": 1, "CD": 2, "DC": 1, "DD": 2 } },
 *       { "state": 2, "plays": "D", "next": { "CC": 1, "CD": 2, "DC": 1, "DD": 2 } }
 *     ]
 *   }
 *
 * States are numbered from 1 as people count them; state 1 starts. `next` is keyed by last round's
 * observed profile, own action first (CD: I cooperated, my partner defected). In memory the same
 * automaton counts states from 0 (app/lib/automata.ts).
 */
import { z } from 'zod';
import { type Automaton, PROFILES } from './automata';
import { type AutomatonIssue, MAX_STATES, validateAutomaton } from './automaton-check';

export const STRATEGY_FORMAT = 'parley-strategy';
export const STRATEGY_FORMAT_VERSION = 1;

const KEYS = ['CC', 'CD', 'DC', 'DD'] as const;

const stateNumber = z.number().int().min(1, 'State numbers start at 1.');

export const strategyFileSchema = z.object({
  format: z.literal(STRATEGY_FORMAT, { message: `"format" must be "${STRATEGY_FORMAT}".` }),
  version: z.literal(STRATEGY_FORMAT_VERSION, { message: `Only version ${STRATEGY_FORMAT_VERSION} of the format exists.` }),
  id: z
    .string()
    .trim()
    .regex(/^[A-Za-z0-9][A-Za-z0-9_-]{0,23}$/, 'The short name ("id") is 1–24 letters, digits, - or _.'),
  name: z.string().trim().min(1, 'Describe the strategy in a few words ("name").').max(120),
  states: z
    .array(
      z.object({
        state: stateNumber,
        plays: z.enum(['C', 'D'], { message: '"plays" is "C" or "D".' }),
        next: z.object({ CC: stateNumber, CD: stateNumber, DC: stateNumber, DD: stateNumber }),
      }),
    )
    .min(1, 'A strategy needs at least one state.')
    .max(MAX_STATES, `A strategy may have at most ${MAX_STATES} states.`),
});

export type StrategyFile = z.infer<typeof strategyFileSchema>;

/** The file form of an automaton. */
export function toStrategyFile(a: Automaton): StrategyFile {
  return {
    format: STRATEGY_FORMAT,
    version: STRATEGY_FORMAT_VERSION,
    id: a.id,
    name: a.name,
    states: a.states.map((s, i) => ({
      state: i + 1,
      plays: s.action,
      next: Object.fromEntries(KEYS.map((k, c) => [k, s.next[PROFILES[c]] + 1])) as StrategyFile['states'][number]['next'],
    })),
  };
}

export type ReadStrategy = { ok: true; automaton: Automaton } | { ok: false; issues: AutomatonIssue[] };

/**
 * Reads a strategy file (already JSON-parsed): the format's own rules first, then the checks every
 * strategy passes (transitions point to states that exist, every state reachable).
 */
export function readStrategyFile(raw: unknown): ReadStrategy {
  const parsed = strategyFileSchema.safeParse(raw);
  if (!parsed.success) {
    return { ok: false, issues: parsed.error.issues.map((i) => ({ path: i.path.join('.') || 'file', message: i.message })) };
  }
  const f = parsed.data;
  const misnumbered = f.states.findIndex((s, i) => s.state !== i + 1);
  if (misnumbered >= 0) {
    return {
      ok: false,
      issues: [
        {
          path: `states.${misnumbered}.state`,
          message: `States are listed in order 1, 2, 3…; entry ${misnumbered + 1} says ${f.states[misnumbered].state}.`,
        },
      ],
    };
  }
  const automaton: Automaton = {
    id: f.id,
    name: f.name,
    states: f.states.map((s) => ({
      action: s.plays,
      next: Object.fromEntries(PROFILES.map((p, c) => [p, s.next[KEYS[c]] - 1])) as Automaton['states'][number]['next'],
    })),
  };
  const issues = validateAutomaton(automaton);
  return issues.length ? { ok: false, issues } : { ok: true, automaton };
}
