/**
 * A test stand-in for the socket hub: applies effects the way the real hub must (store every
 * persist effect of a step, keep timers by key), and plays participants with seeded random choices.
 */
import { isDeepStrictEqual } from 'node:util';
import { uniformInt } from 'pure-rand/distribution/uniformInt';
import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';
import type { RandomGenerator } from 'pure-rand/types/RandomGenerator';
import { type Design, type DesignInput, designSchema } from '#app/lib/design';
import { createSession, step } from '#realtime/engine/engine';
import type { StoredChoice, Effect, EngineEvent, EngineState, LogRow, ParticipantRow, StepResult } from '#realtime/engine/types';

export const T0 = Date.UTC(2025, 0, 15, 10, 0, 0);

export function makeDesign(over: Partial<DesignInput> = {}): Design {
  return designSchema.parse({
    payoffs: { R: 48, S: 12, T: 50, P: 25 }, // Dal Bó & Fréchette (2011) D75R48 payoffs
    delta: 0.75,
    supergames: 4,
    roundSeconds: 20,
    ...over,
  });
}

export class TestHub {
  state: EngineState;
  now = T0;
  participants: ParticipantRow[] = [];
  choices: StoredChoice[] = [];
  log: LogRow[] = [];
  timers = new Map<string, { at: number; event: EngineEvent }>();
  effects: Effect[] = [];
  /** deep-compare the input state after every step: the reducer must never mutate it */
  checkPurity = false;
  /** fire due timers through 'tick' instead of their own timeout events (a hub that lost timers) */
  useTick = false;

  constructor(
    readonly design: Design,
    readonly seed: string | number = 'test-seed',
    readonly sessionId = 'sess-1',
  ) {
    this.state = createSession({ sessionId, design, seed });
  }

  dispatch(event: EngineEvent, at: number = this.now): StepResult {
    this.now = Math.max(this.now, at);
    const input = this.state;
    const snapshot = this.checkPurity ? structuredClone(input) : null;
    const res = step(input, event, at);
    if (snapshot && !isDeepStrictEqual(snapshot, input)) throw new Error(`step mutated its input on ${event.type}`);
    this.state = res.state;
    for (const e of res.effects) {
      this.effects.push(e);
      if (e.type === 'persist-choice') this.choices.push(e.row);
      else if (e.type === 'persist-participant') this.participants.push(e.row);
      else if (e.type === 'persist-log') this.log.push(e.row);
      else if (e.type === 'schedule-timer') this.timers.set(e.key, { at: e.at, event: e.event });
      else if (e.type === 'cancel-timer') this.timers.delete(e.key);
    }
    return res;
  }

  /** must succeed */
  ok(event: EngineEvent, at: number = this.now): StepResult {
    const res = this.dispatch(event, at);
    if (res.error) throw new Error(`${event.type} failed: ${res.error.code} ${res.error.message}`);
    return res;
  }

  nextTimer(): { key: string; at: number; event: EngineEvent } | null {
    let best: { key: string; at: number; event: EngineEvent } | null = null;
    for (const [key, t] of this.timers) if (!best || t.at < best.at || (t.at === best.at && key < best.key)) best = { key, ...t };
    return best;
  }

  /** fire the due timers up to `t` in time order, then move the clock to `t` */
  advanceTo(t: number): void {
    for (let next = this.nextTimer(); next && next.at <= t; next = this.nextTimer()) {
      this.timers.delete(next.key);
      this.now = Math.max(this.now, next.at);
      this.dispatch(this.useTick ? { type: 'tick' } : next.event, this.now);
    }
    this.now = Math.max(this.now, t);
  }
}

export function rngOf(seed: number): RandomGenerator {
  return xoroshiro128plus(seed);
}

export interface PlayOptions {
  /** probability (per mille) that a participant lets the timer run out */
  lateProb?: number;
  /** probability (per mille) of cooperating */
  coopProb?: number;
  /** stop when this returns true (checked after each event) */
  stopWhen?: (hub: TestHub) => boolean;
  maxEvents?: number;
}

/**
 * Play until the session completes (or stopWhen): each participant who must choose picks a seeded
 * random time (sometimes past the deadline, so timeouts happen) and a seeded random action.
 * Returns the error codes the engine answered with (stale choices after a timeout are normal).
 */
export function play(hub: TestHub, rng: RandomGenerator, opts: PlayOptions = {}): string[] {
  const late = opts.lateProb ?? 50;
  const coop = opts.coopProb ?? 600;
  const roundMs = hub.design.roundSeconds * 1000;
  const planned = new Map<string, { at: number; supergame: number; round: number; action: 'C' | 'D' }>();
  const errors: string[] = [];
  for (let n = 0; n < (opts.maxEvents ?? 200_000); n++) {
    const s = hub.state;
    if (s.status !== 'running' || (opts.stopWhen && opts.stopWhen(hub))) return errors;
    const sg = s.supergame!.number;
    for (const id of s.joinOrder) {
      const p = s.participants[id];
      if (!p.pairId || p.seat === null) continue;
      const pair = s.pairs[p.pairId];
      if (pair.done || pair.pending[p.seat] || pair.seats[p.seat].computer) continue;
      const plan = planned.get(id);
      if (plan && plan.supergame === sg && plan.round === pair.round) continue;
      const delay = uniformInt(rng, 0, 999) < late ? roundMs + 1000 : uniformInt(rng, 200, roundMs - 500);
      planned.set(id, {
        at: hub.now + delay,
        supergame: sg,
        round: pair.round,
        action: uniformInt(rng, 0, 999) < coop ? 'C' : 'D',
      });
    }
    let who: string | null = null;
    let when = Number.POSITIVE_INFINITY;
    for (const [id, plan] of planned) {
      if (plan.at < when || (plan.at === when && who !== null && id < who)) {
        who = id;
        when = plan.at;
      }
    }
    const timer = hub.nextTimer();
    if (timer && timer.at <= when) {
      hub.advanceTo(timer.at);
      continue;
    }
    if (who === null) throw new Error('Nobody can move and no timer is set');
    const plan = planned.get(who)!;
    planned.delete(who);
    hub.now = Math.max(hub.now, plan.at);
    const res = hub.dispatch({
      type: 'choose',
      participantId: who,
      supergame: plan.supergame,
      round: plan.round,
      action: plan.action,
      clientChoiceId: `${who}-${plan.supergame}-${plan.round}`,
    });
    if (res.error) errors.push(res.error.code);
  }
  throw new Error('Too many events');
}

/** A state without the volatile connection map, for comparing live and rebuilt states. */
export function logical(s: EngineState): Omit<EngineState, 'connections'> {
  const { connections: _ignored, ...rest } = s;
  return rest;
}

export function joinAll(hub: TestHub, n: number, prefix = 'u'): string[] {
  const ids: string[] = [];
  for (let i = 1; i <= n; i++) {
    const id = `${prefix}${String(i).padStart(4, '0')}`;
    hub.ok({ type: 'join', participantId: id }, hub.now + 10);
    ids.push(id);
  }
  return ids;
}
