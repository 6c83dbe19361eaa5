/**
 * Closed-form δ-thresholds of methods.md §1 for the design editor's theory panel.
 * All assume a valid prisoner's dilemma T > R > P > S (see checkStageGame).
 */
import type { StageGame } from './stage-game';

/** Relative tolerance for comparing two thresholds or δ with a threshold (double rounding). */
export const THRESHOLD_REL_TOL = 1e-12;

function close(a: number, b: number): boolean {
  return Math.abs(a - b) <= THRESHOLD_REL_TOL * Math.max(Math.abs(a), Math.abs(b));
}

/** δ ≥ threshold, counting δ equal to the threshold up to rounding (the conditions are weak). */
export function atLeast(delta: number, threshold: number): boolean {
  return delta >= threshold || close(delta, threshold);
}

/** Grim trigger is SPE (and Nash) iff δ ≥ (T−R)/(T−P). Source: Friedman (1971) [mem]; methods.md §1. */
export function grimSPE(game: StageGame): number {
  return (game.T - game.R) / (game.T - game.P);
}

export interface TftNash {
  /** max of the two; TFT is Nash iff δ ≥ threshold (never when threshold ≥ 1) */
  threshold: number;
  /** which deviation sets the threshold; 'defect-forever' on a tie */
  binding: 'defect-forever' | 'alternate';
  /** no gain from defecting forever iff δ ≥ (T−R)/(T−P) */
  defectForever: number;
  /** no gain from alternating D, C, D, C iff δ ≥ (T−R)/(R−S) */
  alternate: number;
}

/**
 * Tit-for-tat is Nash iff δ ≥ max{(T−R)/(T−P), (T−R)/(R−S)}.
 * Source: Axelrod (1981, 1984), collective stability; methods.md §1.
 */
export function tftNash(game: StageGame): TftNash {
  const defectForever = (game.T - game.R) / (game.T - game.P);
  const alternate = (game.T - game.R) / (game.R - game.S);
  const binding = alternate > defectForever && !close(alternate, defectForever) ? 'alternate' : 'defect-forever';
  return { threshold: Math.max(defectForever, alternate), binding, defectForever, alternate };
}

export type TftSpe = { kind: 'knife-edge'; delta: number } | { kind: 'never' };

/**
 * Tit-for-tat is SPE only when δ = (T−R)/(R−S) = (P−S)/(T−P) (knife edge): the one-shot
 * conditions at (C,C) and (D,C) pin δ from both sides at (T−R)/(R−S), those at (D,D) and (C,D)
 * at (P−S)/(T−P). Source: Kalai, Samet & Stanford (1988) [mem]; one-shot deviation [calc].
 */
export function tftSPE(game: StageGame): TftSpe {
  const a = (game.T - game.R) / (game.R - game.S);
  const b = (game.P - game.S) / (game.T - game.P);
  if (!close(a, b)) return { kind: 'never' };
  const delta = (a + b) / 2;
  return delta > 0 && delta < 1 ? { kind: 'knife-edge', delta } : { kind: 'never' };
}

/**
 * Win-stay lose-shift is SPE iff δ ≥ g = (T−R)/(R−P); null when g ≥ 1 (2R ≤ T + P).
 * Source: one-shot deviation [calc], methods.md §1.
 */
export function wslsSPE(game: StageGame): number | null {
  const g = (game.T - game.R) / (game.R - game.P);
  return g < 1 ? g : null;
}

/**
 * Grim risk-dominates ALLD iff δ ≥ (T−R+P−S)/(T−S).
 * Source: Blonski, Ockenfels & Spagnolo (2011); Dal Bó & Fréchette (2011).
 */
export function riskDominance(game: StageGame): number {
  return (game.T - game.R + game.P - game.S) / (game.T - game.S);
}

/**
 * Size of the basin of attraction of ALLD against Grim: the Grim share at which a player is
 * indifferent between them, (1−δ)(P−S) / [(1−δ)(P−S) + δ(R−P) − (1−δ)(T−R)].
 * Convention: 1 when δ ≤ (T−R)/(T−P), where Grim is not an equilibrium and the raw formula is
 * meaningless. Source: Dal Bó & Fréchette (2011, 2018); closed form [calc], methods.md §1.
 */
export function sizeBAD(game: StageGame, delta: number): number {
  const { T, R, P, S } = game;
  if (delta <= grimSPE(game)) return 1;
  // At δ = δ_RD the closed form is exactly ½ [calc]; doubles land a hair either side of it, and
  // the panel must not call the tie "defection favoured" (basinAt decides with the same test).
  if (close(delta, riskDominance(game))) return 1 / 2;
  const num = (1 - delta) * (P - S);
  return num / (num + delta * (R - P) - (1 - delta) * (T - R));
}

/**
 * Which side of δ_RD δ lies on; sizeBAD < ½ ⇔ δ > δ_RD and sizeBAD = ½ at δ_RD (methods.md §1).
 * The one comparison behind both the risk-dominance verdict and the words beside sizeBAD, so the
 * two never disagree at the tie (issue 10).
 */
export type Basin = 'cooperation' | 'tie' | 'defection';

export function basinAt(game: StageGame, delta: number): Basin {
  const rd = riskDominance(game);
  if (close(delta, rd)) return 'tie';
  return delta > rd ? 'cooperation' : 'defection';
}

/** The words beside sizeBAD in the theory panel. */
export function basinWords(basin: Basin): string {
  return basin === 'cooperation'
    ? 'under ½: cooperation favoured'
    : basin === 'tie'
      ? 'exactly ½: neither favoured'
      : 'over ½: defection favoured';
}

export interface TheoryAt {
  delta: number;
  g: number;
  l: number;
  grimSPE: number;
  tftNash: TftNash;
  tftSPE: TftSpe;
  wslsSPE: number | null;
  riskDominance: number;
  sizeBAD: number;
  /** yes/no at this δ; boundaries count as "yes" (all conditions are weak inequalities) */
  verdicts: {
    grimSPE: boolean;
    tftNash: boolean;
    tftSPE: boolean;
    wslsSPE: boolean;
    /** Grim risk-dominates ALLD, weakly as in methods.md §1 (equivalently sizeBAD ≤ 1/2) */
    riskDominant: boolean;
    /** the side of δ_RD: 'tie' at δ = δ_RD, where neither strategy strictly risk-dominates */
    basin: Basin;
  };
}

/** Every threshold of methods.md §1 and its verdict at δ, for the design editor's theory panel. */
export function theoryAt(game: StageGame, delta: number): TheoryAt {
  const grim = grimSPE(game);
  const tn = tftNash(game);
  const ts = tftSPE(game);
  const ws = wslsSPE(game);
  const rd = riskDominance(game);
  const basin = basinAt(game, delta);
  return {
    delta,
    g: (game.T - game.R) / (game.R - game.P),
    l: (game.P - game.S) / (game.R - game.P),
    grimSPE: grim,
    tftNash: tn,
    tftSPE: ts,
    wslsSPE: ws,
    riskDominance: rd,
    sizeBAD: sizeBAD(game, delta),
    verdicts: {
      grimSPE: atLeast(delta, grim),
      tftNash: tn.threshold < 1 && atLeast(delta, tn.threshold),
      tftSPE: ts.kind === 'knife-edge' && close(delta, ts.delta),
      wslsSPE: ws !== null && atLeast(delta, ws),
      riskDominant: basin !== 'defection',
      basin,
    },
  };
}
