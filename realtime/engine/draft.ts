/**
 * The engine's working copy for one step (Draft) and the small rules every part uses: legal status
 * transitions, the round length, the open pairs, timer keys. The input state is never mutated.
 */
import type {
  BatchScope,
  EngineError,
  EngineState,
  ErrorCode,
  LoggedEvent,
  ParticipantState,
  PairState,
  StoredChoice,
  Effect,
  SessionStatus,
} from './types';

export function timerKey(sessionId: string, pairId: string, round: number): string {
  return `${sessionId}:${pairId}:${round}`;
}

/**
 * Copy-on-write working copy of the state for one step. The big records (participants, pairs,
 * recent choices, connections) are copied only when first written: copying 1000-key records on every
 * choice dominated the cost of a step in a large session.
 */
export type RecordKey = 'participants' | 'pairs' | 'recentChoices' | 'connections';

/**
 * A scope for a batch of steps (see BatchScope in types.ts). The state the batch started from is
 * still never mutated. Handlers check before they write, so a step that fails leaves the batch's
 * copies as they were (tests/unit/engine.test.ts checks a batch against single steps).
 */
export function newBatchScope(): BatchScope {
  return { copied: new Set<RecordKey>(), clonedParticipants: new Set<string>(), clonedPairs: new Set<string>() };
}

export class Draft {
  s: EngineState;
  private copied: Set<RecordKey>;
  private clonedParticipants: Set<string>;
  private clonedPairs: Set<string>;
  persists: Effect[] = [];
  timers: Effect[] = [];
  touched = new Set<string>();
  touchAll = false;
  row: StoredChoice | undefined;

  constructor(
    state: EngineState,
    readonly now: number,
    scope: BatchScope = newBatchScope(),
  ) {
    this.s = { ...state };
    this.copied = scope.copied;
    this.clonedParticipants = scope.clonedParticipants;
    this.clonedPairs = scope.clonedPairs;
  }

  /** the record, copied once in this step, ready to be written */
  w<K extends RecordKey>(key: K): EngineState[K] {
    if (!this.copied.has(key)) {
      this.s[key] = { ...this.s[key] };
      this.copied.add(key);
    }
    return this.s[key];
  }

  /** a new record replaces the old one wholesale (a new supergame's pairs) */
  replace<K extends 'pairs'>(key: K, value: EngineState[K]): void {
    this.s[key] = value;
    this.copied.add(key);
  }

  p(id: string): ParticipantState {
    if (!this.clonedParticipants.has(id)) {
      this.w('participants')[id] = structuredClone(this.s.participants[id]);
      this.clonedParticipants.add(id);
    }
    this.touched.add(id);
    return this.s.participants[id];
  }

  pair(id: string): PairState {
    if (!this.clonedPairs.has(id)) {
      this.w('pairs')[id] = structuredClone(this.s.pairs[id]);
      this.clonedPairs.add(id);
    }
    for (const seat of this.s.pairs[id].seats) if (seat.participantId) this.touched.add(seat.participantId);
    return this.s.pairs[id];
  }

  nextSeq(): number {
    this.s.seq += 1;
    return this.s.seq;
  }

  log(event: LoggedEvent): void {
    this.persists.push({ type: 'persist-log', row: { seq: this.nextSeq(), at: this.now, event } });
  }

  /** a staff action that changes the session row: logged, the session row written, applied */
  record(event: LoggedEvent): null {
    this.log(event);
    this.session(this.now);
    return null;
  }

  session(at: number): void {
    this.persists.push({
      type: 'persist-session',
      status: this.s.status,
      supergame: this.s.supergame?.number ?? 0,
      at,
    });
    this.touchAll = true;
  }
}

export const fail = (code: ErrorCode, message: string): EngineError => ({ code, message });

export function transition(d: Draft, allowed: SessionStatus[], to: SessionStatus, what: string): EngineError | null {
  if (!allowed.includes(d.s.status)) {
    return fail('illegal-transition', `Cannot ${what} a session that is ${d.s.status}`);
  }
  d.s.status = to;
  return null;
}

export const roundMs = (d: Draft): number => d.s.design.roundSeconds * 1000;

/** Running or paused: a supergame is under way. */
export const playing = (s: EngineState): boolean => s.status === 'running' || s.status === 'paused';

/** Pairs whose supergame is still being played. */
export function openPairIds(s: EngineState): string[] {
  return (s.supergame?.pairIds ?? []).filter((id) => !s.pairs[id].done);
}
