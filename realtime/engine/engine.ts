/**
 * The live-session reducer: step(state, event, now) → { state, effects }.
 *
 * Rules (product.md, "Play", "Floor and Conductor"):
 * - pairs advance round by round at their own pace inside a supergame; a round resolves when both
 *   seats have a choice: payoffs from the frozen design, the session's common draw, next round or
 *   end of the pair's supergame;
 * - the session waits for every pair at the end of a supergame, then re-matches, or completes after
 *   N supergames or after "end after this supergame";
 * - late joiners enter at the next supergame; a missing choice is filled at the deadline by the
 *   design's timeout rule; computer seats choose at once.
 *
 * Determinism: every time the engine derives (a round's resolution time, a supergame's start) comes
 * from stored row times, and every random number from the session seed, so replaying the stored rows
 * in their sequence order rebuilds the same state (see rebuild.ts). The input state is never mutated.
 *
 * The parts: draft.ts (the working copy of one step), rounds.ts (a pair's rounds), supergames.ts
 * (matching, moving on, completing), handlers.ts (one handler per event type); views.ts builds
 * what the phones and staff see, rebuild.ts replays stored rows.
 */
import type { Design } from '#app/lib/design';
import { normaliseSeed, type Seed } from '#app/lib/rng';
import { Draft, fail, openPairIds, timerKey } from './draft';
import { handle } from './handlers';
import type { Effect, EngineEvent, EngineState, StepOptions, StepResult } from './types';
import { bigScreenView, floorView, participantView } from './views';

export { newBatchScope } from './draft';

export function createSession(opts: { sessionId: string; design: Design; seed: Seed }): EngineState {
  return {
    sessionId: opts.sessionId,
    design: opts.design,
    seed: normaliseSeed(opts.seed),
    status: 'draft',
    seq: 0,
    participants: {},
    joinOrder: [],
    supergame: null,
    pairs: {},
    pastPairs: [],
    summaries: [],
    recentChoices: {},
    endAfterSupergame: false,
    pausedAt: null,
    startedAt: null,
    completedAt: null,
    connections: {},
  };
}

export function roomOf(kind: 'session' | 'staff' | 'participant', sessionId: string, participantId?: string): string {
  return kind === 'participant' ? `participant:${sessionId}:${participantId}` : `${kind}:${sessionId}`;
}
/** Apply one event. On an error the state is returned unchanged and there are no effects. */
export function step(state: EngineState, event: EngineEvent, now: number, options: StepOptions = {}): StepResult {
  const d = new Draft(state, now, options.batch);
  const out = handle(d, event);
  if (out && 'alreadyChosen' in out) {
    return {
      state,
      effects: [],
      error: fail('already-chosen', 'This round already has a stored choice'),
      row: out.alreadyChosen,
      touched: [],
    };
  }
  if (out) return { state, effects: [], error: out, touched: [] };
  const s = d.s;
  const quiet = event.type === 'tick' && d.persists.length === 0;
  const touched = quiet ? [] : d.touchAll ? s.joinOrder : s.joinOrder.filter((id) => d.touched.has(id));
  const broadcasts: Effect[] = [];
  if (!quiet && options.views !== 'none') {
    for (const id of touched) {
      broadcasts.push({
        type: 'broadcast',
        room: roomOf('participant', s.sessionId, id),
        payload: { kind: 'participant-view', view: participantView(s, id) },
      });
    }
    broadcasts.push({ type: 'broadcast', room: roomOf('staff', s.sessionId), payload: { kind: 'floor-view', view: floorView(s, now) } });
    broadcasts.push({
      type: 'broadcast',
      room: roomOf('session', s.sessionId),
      payload: { kind: 'big-screen-view', view: bigScreenView(s) },
    });
  }
  return { state: s, effects: [...d.persists, ...d.timers, ...broadcasts], row: d.row, touched };
}

/**
 * Timers to (re)arm after a restart: one per open round that still waits for a choice, at its
 * deadline (a deadline already past means "fire now"). Nothing while paused: resume arms them.
 */
export function resumeEffects(state: EngineState): Effect[] {
  if (state.status !== 'running') return [];
  const out: Effect[] = [];
  for (const id of openPairIds(state)) {
    const pair = state.pairs[id];
    if (pair.deadline === null || (pair.pending[0] && pair.pending[1])) continue;
    out.push({
      type: 'schedule-timer',
      key: timerKey(state.sessionId, pair.id, pair.round),
      at: pair.deadline,
      event: { type: 'timeout', pairId: pair.id, round: pair.round },
    });
  }
  return out;
}
