// Simulated choices for the demo's completed sessions: each invented participant follows one
// strategy of a stated mixture with a tremble, driven through the real session engine, so the
// stored rows are exactly what a live session would store. Labelled as simulated everywhere.
import { type Action, libraryStrategy, prescribedActions } from '#app/lib/automata';
import type { Design } from '#app/lib/design';
import { mulberry32 } from '#app/lib/prng';
import { createSession, step } from '#realtime/engine/engine';
import type { Effect, EngineEvent, EngineState } from '#realtime/engine/types';
import { participantView } from '#realtime/engine/views';

/** The stated mixtures (invented for the demo; the shares are the truth SFEM should recover). */
export const DEMO_MIXTURES = {
  short: { ALLD: 0.55, TFT: 0.15, Grim: 0.1, STFT: 0.1, ALLC: 0.1 },
  long: { TFT: 0.35, Grim: 0.25, ALLD: 0.2, WSLS: 0.1, ALLC: 0.1 },
} as const satisfies Record<string, Record<string, number>>;

/** Each intended action flips with this probability. */
export const DEMO_TREMBLE = 0.05;

export interface Simulated {
  state: EngineState;
  effects: Effect[];
  /** the strategy each participant followed (for the demo's notes, never shown to participants) */
  strategies: Record<string, string>;
}

/** Plays a whole session: open, everyone joins, start, then every choice until it completes. */
export function simulateSession(opts: {
  sessionId: string;
  design: Design;
  seed: number;
  participantIds: string[];
  mixture: Record<string, number>;
  rngSeed: number;
  startMs: number;
}): Simulated {
  const rand = mulberry32(opts.rngSeed);
  const ids = Object.keys(opts.mixture);
  const pick = () => {
    let u = rand();
    for (const id of ids) {
      u -= opts.mixture[id];
      if (u < 0) return id;
    }
    return ids[ids.length - 1];
  };
  const strategies: Record<string, string> = {};
  for (const p of opts.participantIds) strategies[p] = pick();

  let state = createSession({ sessionId: opts.sessionId, design: opts.design, seed: opts.seed });
  let now = opts.startMs;
  const effects: Effect[] = [];
  const apply = (e: EngineEvent) => {
    const res = step(state, e, now, { views: 'none' });
    if (res.error) throw new Error(`simulation: ${e.type} failed: ${res.error.code} ${res.error.message}`);
    state = res.state;
    for (const x of res.effects) if (x.type.startsWith('persist-')) effects.push(x);
  };
  apply({ type: 'open' });
  for (const p of opts.participantIds) {
    now += 1500 + Math.floor(rand() * 4000);
    apply({ type: 'join', participantId: p });
  }
  now += 20_000;
  apply({ type: 'start' });
  let guard = 0;
  while (state.status === 'running' && guard++ < 100_000) {
    let moved = false;
    for (const p of opts.participantIds) {
      const v = participantView(state, p);
      if (v.status !== 'choosing' || v.ownChoice !== null || v.round === null) continue;
      const own = v.history.map((h) => h.own);
      const partner = v.history.map((h) => h.partner);
      const automaton = libraryStrategy(strategies[p]);
      const intended = prescribedActions(automaton, [...own, 'C'], [...partner, 'C'])[own.length];
      const action: Action = rand() < DEMO_TREMBLE ? (intended === 'C' ? 'D' : 'C') : intended;
      // the class chooses in parallel: a few hundred ms between consecutive choices in the room
      now += 100 + Math.floor(rand() * 400);
      apply({
        type: 'choose',
        participantId: p,
        supergame: v.supergame,
        round: v.round,
        action,
        clientChoiceId: `sim-${p}-${v.supergame}-${v.round}`,
      });
      moved = true;
    }
    if (!moved) {
      // Everyone has chosen: let the engine move on (between-supergame pauses are timer-free).
      now += 3000;
      apply({ type: 'tick' });
    }
  }
  if (state.status !== 'complete') throw new Error(`simulation did not complete (status ${state.status})`);
  return { state, effects, strategies };
}
