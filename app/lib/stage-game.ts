/**
 * The symmetric 2×2 stage game (methods.md §0): row payoffs u(C,C)=R, u(C,D)=S, u(D,C)=T,
 * u(D,D)=P; a prisoner's dilemma needs T > R > P > S.
 */
import type { Action } from './automata';

export interface StageGame {
  R: number;
  S: number;
  T: number;
  P: number;
}

export type StageGameField = keyof StageGame | 'delta';

export interface FieldIssue {
  field: StageGameField;
  message: string;
}

export interface StageGameCheck {
  errors: FieldIssue[];
  warnings: FieldIssue[];
}

const FIELDS = ['T', 'R', 'P', 'S'] as const;

/**
 * Validates payoffs (and δ when given) for the design form. Errors block saving; warnings are
 * shown beside the fields but allowed (some designs deliberately break 2R > T + S).
 */
export function checkStageGame(g: StageGame, delta?: number): StageGameCheck {
  const errors: FieldIssue[] = [];
  const warnings: FieldIssue[] = [];

  for (const f of FIELDS) {
    const x = g[f] as unknown;
    if (typeof x !== 'number' || !Number.isFinite(x)) {
      errors.push({ field: f, message: `${f} must be a finite number.` });
    }
  }

  if (delta !== undefined) {
    if (typeof delta !== 'number' || !Number.isFinite(delta)) {
      errors.push({ field: 'delta', message: 'δ must be a finite number.' });
    } else if (!(delta > 0 && delta < 1)) {
      // δ = 1 never ends a supergame; δ = 0 is a one-shot game, not a repeated one.
      errors.push({ field: 'delta', message: 'δ must lie strictly between 0 and 1.' });
    }
  }

  // Ordering checks only make sense once every payoff is a number.
  if (errors.some((e) => e.field !== 'delta')) return { errors, warnings };

  const { T, R, P, S } = g;
  // Source: methods.md §0 — a prisoner's dilemma needs T > R > P > S.
  if (!(T > R))
    errors.push({
      field: 'T',
      message: `T (${T}) must be greater than R (${R}): defecting on a cooperator must pay more than cooperating.`,
    });
  if (!(R > P))
    errors.push({ field: 'R', message: `R (${R}) must be greater than P (${P}): mutual cooperation must beat mutual defection.` });
  if (!(P > S)) errors.push({ field: 'P', message: `P (${P}) must be greater than S (${S}): being exploited must be the worst outcome.` });

  if (errors.length === 0) {
    // Source: methods.md §0 "usually also 2R > T + S".
    if (2 * R <= T + S) {
      warnings.push({
        field: 'R',
        message: `2R (${2 * R}) ≤ T + S (${T + S}): alternating C/D beats mutual cooperation, so tit-for-tat is never a Nash equilibrium.`,
      });
    }
    // Source: methods.md §1 — WSLS is SPE only if 2R > T + P.
    if (2 * R <= T + P) {
      warnings.push({
        field: 'R',
        message: `2R (${2 * R}) ≤ T + P (${T + P}): win-stay lose-shift is never subgame perfect.`,
      });
    }
  }
  return { errors, warnings };
}

/** Normalised payoffs, methods.md §0: g = (T−R)/(R−P) (gain from defecting), l = (P−S)/(R−P) (loss from being exploited). */
export function normalised(game: StageGame): { g: number; l: number } {
  const { T, R, P, S } = game;
  return { g: (T - R) / (R - P), l: (P - S) / (R - P) };
}

/** Row player's stage payoff: the one place actions become points (engine, views, practice, instructions, panel). */
export function stagePayoff(game: StageGame, own: Action, partner: Action): number {
  if (own === 'C') return partner === 'C' ? game.R : game.S;
  return partner === 'C' ? game.T : game.P;
}

/** Both players' points for a pair of actions: [own, partner]. */
export function profilePoints(game: StageGame, own: Action, partner: Action): [number, number] {
  return [stagePayoff(game, own, partner), stagePayoff(game, partner, own)];
}

/** The four action profiles in the order a payoff table lists them: CC, CD, DC, DD. */
export const ACTION_PROFILES: readonly (readonly [Action, Action])[] = [
  ['C', 'C'],
  ['C', 'D'],
  ['D', 'C'],
  ['D', 'D'],
];

/**
 * Payoffs indexed by profile code own*2 + partner with C = 0, D = 1: [R, S, T, P].
 * The numeric code is what the fast solvers use.
 */
export function payoffTable(game: StageGame): Float64Array {
  return Float64Array.of(game.R, game.S, game.T, game.P);
}
