/**
 * One handler per engine event, as a typed map (event type → handler): each handler gets its own
 * event type, checks before it writes, and answers null (applied), an EngineError (nothing
 * changes) or the stored row of a choice already made.
 */
import { computerStrategyOf } from '#app/lib/design';
import { drawSequence } from '#app/lib/draws';
import { type Draft, fail, openPairIds, playing, roundMs, transition } from './draft';
import { advancePair, applyTimeout, cancelTimer, findParticipant, handOver, isStrategy, reveal, addRow, scheduleTimer } from './rounds';
import { beginSupergame, completeSession, lateEntryRefusal, settle, summarise } from './supergames';
import type { EngineError, EngineEvent, EngineState, StoredChoice } from './types';

export type Outcome = EngineError | { alreadyChosen: StoredChoice } | null;

type EventOf = { [E in EngineEvent as E['type']]: E };
type Handlers = { [T in keyof EventOf]: (d: Draft, e: EventOf[T]) => Outcome };

export function pseudonymFor(joinIndex: number): string {
  return `P-${String(joinIndex + 1).padStart(3, '0')}`;
}

const cannotEnd = (s: EngineState) => fail('illegal-transition', `Cannot end a session that is ${s.status}`);

/** reconnect / disconnect: not stored; they only change what the Floor shows. */
function connection(d: Draft, e: EventOf['reconnect' | 'disconnect']): Outcome {
  if (!d.s.participants[e.participantId]) return fail('not-a-participant', `"${e.participantId}" is not a participant`);
  d.w('connections')[e.participantId] = { connected: e.type === 'reconnect', since: d.now };
  d.touched.add(e.participantId);
  return null;
}

const HANDLERS: Handlers = {
  open: (d) => {
    const s = d.s;
    const err = transition(d, ['draft'], 'open', 'open');
    if (err) return err;
    d.log({ type: 'open' });
    d.session(d.now);
    d.persists.push({
      type: 'persist-draws',
      supergames: drawSequence(s.seed, s.design.delta, s.design.supergames, s.design.termination).supergames,
    });
    return null;
  },
  join: (d, e) => {
    const s = d.s;
    if (!['open', 'running', 'paused'].includes(s.status)) {
      return fail('session-not-joinable', `The session is ${s.status}`);
    }
    const entersAt = s.status === 'open' ? 1 : (s.supergame?.number ?? 0) + 1;
    const known = s.participants[e.participantId];
    const full = known ? null : lateEntryRefusal(s);
    if (full) return fail('session-not-joinable', full);
    if (known) {
      if (known.status === 'removed') return fail('not-a-participant', 'This participant was removed from the session');
      if (known.status === 'active') {
        d.touched.add(e.participantId);
        return null;
      }
      // back after being handed to a computer: enters at the next supergame, like a late joiner
      const p = d.p(e.participantId);
      p.status = 'active';
      p.entersAt = entersAt;
      d.log({ type: 'join', participantId: e.participantId });
      return null;
    }
    const joinIndex = s.joinOrder.length;
    s.joinOrder = [...s.joinOrder, e.participantId];
    d.w('participants')[e.participantId] = {
      id: e.participantId,
      pseudonym: pseudonymFor(joinIndex),
      joinIndex,
      joinedAt: d.now,
      entersAt,
      status: 'active',
      oddCount: 0,
      points: 0,
      timeouts: 0,
      pairId: null,
      seat: null,
      sittingOut: false,
      last: null,
    };
    d.touched.add(e.participantId);
    d.persists.push({
      type: 'persist-participant',
      row: { id: e.participantId, pseudonym: pseudonymFor(joinIndex), joinedAt: d.now, seq: d.nextSeq() },
    });
    return null;
  },
  start: (d) => {
    const s = d.s;
    const present = s.joinOrder.filter((id) => s.participants[id].status === 'active').length;
    if (s.status === 'open' && present < 2) {
      return fail('too-few-participants', `Starting needs at least 2 participants; ${present} joined`);
    }
    const err = transition(d, ['open'], 'running', 'start');
    if (err) return err;
    s.startedAt = d.now;
    d.log({ type: 'start' });
    beginSupergame(d, 1, d.now);
    settle(d);
    return null;
  },
  pause: (d) => {
    const s = d.s;
    const err = transition(d, ['running'], 'paused', 'pause');
    if (err) return err;
    s.pausedAt = d.now;
    for (const id of openPairIds(s)) {
      const pair = d.pair(id);
      if (pair.deadline !== null) pair.remainingMs = Math.max(0, pair.deadline - d.now);
      pair.deadline = null;
      cancelTimer(d, pair);
    }
    return d.record({ type: 'pause' });
  },
  resume: (d) => {
    const s = d.s;
    const pausedAt = s.pausedAt ?? d.now;
    const err = transition(d, ['paused'], 'running', 'resume');
    if (err) return err;
    s.pausedAt = null;
    for (const id of openPairIds(s)) {
      const pair = d.pair(id);
      pair.pausedMs += d.now - Math.max(pausedAt, pair.openedAt);
      pair.deadline = d.now + (pair.remainingMs ?? roundMs(d));
      pair.remainingMs = null;
      if (!(pair.pending[0] && pair.pending[1])) scheduleTimer(d, pair);
    }
    return d.record({ type: 'resume' });
  },
  endAfterSupergame: (d) => {
    const s = d.s;
    if (!playing(s)) return cannotEnd(s);
    if (s.endAfterSupergame) return null;
    s.endAfterSupergame = true;
    return d.record({ type: 'endAfterSupergame' });
  },
  endNow: (d) => {
    const s = d.s;
    if (!playing(s)) return cannotEnd(s);
    for (const id of openPairIds(s)) {
      const pair = d.pair(id);
      cancelTimer(d, pair);
      pair.deadline = null;
      pair.remainingMs = null;
      // rounds already played whose block was not announced yet: settle them by the rule
      if (pair.rounds.length > 0) reveal(d, pair, 1, pair.rounds[pair.rounds.length - 1].round);
    }
    if (s.supergame) s.summaries = [...s.summaries, summarise(s, true)];
    d.log({ type: 'endNow' });
    completeSession(d, d.now);
    return null;
  },
  archive: (d) => {
    const err = transition(d, ['complete'], 'archived', 'archive');
    if (err) return err;
    return d.record({ type: 'archive' });
  },
  cancel: (d) => {
    // Only before the start: nothing has been played, so nothing is lost; the lobby's phones
    // are told, and the join code stops working (it admits open, running and paused sessions).
    const err = transition(d, ['open'], 'cancelled', 'cancel');
    if (err) return err;
    d.s.completedAt = d.now;
    return d.record({ type: 'cancel' });
  },
  handToComputer: (d, e) => {
    const s = d.s;
    if (!playing(s)) return fail('session-not-running', `The session is ${s.status}`);
    if (!isStrategy(e.strategy)) return fail('unknown-strategy', `No strategy "${e.strategy}" in the library`);
    const p = findParticipant(d, e.participantId);
    if ('code' in p) return p;
    if (p.status === 'handed') return fail('already-handed', `${p.pseudonym} is already played by a computer`);
    d.p(p.id).status = 'handed';
    d.log({ type: 'handToComputer', participantId: p.id, strategy: e.strategy });
    handOver(d, p.id, e.strategy);
    settle(d);
    return null;
  },
  remove: (d, e) => {
    const s = d.s;
    if (!['open', 'running', 'paused'].includes(s.status)) {
      return fail('illegal-transition', `Cannot remove participants from a session that is ${s.status}`);
    }
    const p = findParticipant(d, e.participantId);
    if ('code' in p) return p;
    d.p(p.id).status = 'removed';
    d.log({ type: 'remove', participantId: p.id });
    // the partner finishes the supergame against a disclosed computer
    handOver(d, p.id, computerStrategyOf(s.design));
    settle(d);
    return null;
  },
  choose: (d, e) => {
    const s = d.s;
    const p = findParticipant(d, e.participantId);
    if ('code' in p) return p;
    const stored = s.recentChoices[e.participantId]?.find((r) => r.supergame === e.supergame && r.round === e.round);
    if (stored) return { alreadyChosen: stored };
    if (s.status !== 'running') return fail('session-not-running', `The session is ${s.status}`);
    if (e.action !== 'C' && e.action !== 'D') return fail('bad-event', `Unknown action "${String(e.action)}"`);
    const current = s.supergame?.number ?? 0;
    if (e.supergame < current) return fail('round-closed', `Supergame ${e.supergame} is over`);
    if (!p.pairId || p.seat === null || (e.pairId !== undefined && e.pairId !== p.pairId)) {
      return fail('not-your-pair', `${p.pseudonym} is not in ${e.pairId ?? 'a pair'} this supergame`);
    }
    if (e.supergame > current) return fail('round-not-open', `Supergame ${e.supergame} has not started`);
    const existing = s.pairs[p.pairId];
    if (existing.seats[p.seat].computer) return fail('handed-to-computer', `A computer plays for ${p.pseudonym}`);
    if (existing.done || e.round < existing.round) return fail('round-closed', `Round ${e.round} is closed`);
    if (e.round > existing.round) return fail('round-not-open', `Round ${e.round} is not open`);
    const pair = d.pair(p.pairId);
    d.row = addRow(d, pair, p.seat, e.action, 'player', null, e.clientChoiceId, d.now);
    advancePair(d, pair.id, d.now);
    settle(d);
    return null;
  },
  timeout: (d, e) => {
    const err = applyTimeout(d, e.pairId, e.round);
    if (err) return err;
    settle(d);
    return null;
  },
  grace: (d) => {
    const s = d.s;
    if (!playing(s)) return null;
    const waiting = openPairIds(s).filter((id) => !(s.pairs[id].pending[0] && s.pairs[id].pending[1]));
    // nothing to extend: no row, so a replay (which only sees rows) stays identical
    if (waiting.length === 0) return null;
    d.log({ type: 'grace' });
    for (const id of waiting) {
      const pair = d.pair(id);
      if (s.status === 'running') {
        pair.deadline = d.now + roundMs(d);
        scheduleTimer(d, pair);
      } else {
        pair.remainingMs = roundMs(d);
      }
    }
    return null;
  },
  tick: (d) => {
    const s = d.s;
    if (s.status !== 'running') return null;
    const due = openPairIds(s).filter((id) => {
      const pair = s.pairs[id];
      return pair.deadline !== null && pair.deadline <= d.now && !(pair.pending[0] && pair.pending[1]);
    });
    for (const id of due) {
      // an earlier timeout in this loop may have moved the supergame on
      const pair = d.s.pairs[id];
      if (pair && !pair.done && pair.deadline !== null && pair.deadline <= d.now) applyTimeout(d, id, pair.round);
    }
    if (due.length > 0) settle(d);
    return null;
  },
  reconnect: connection,
  disconnect: connection,
};

const handles = (type: string): type is keyof EventOf => Object.hasOwn(HANDLERS, type);

function run<T extends keyof EventOf>(d: Draft, type: T, e: EventOf[T]): Outcome {
  return HANDLERS[type](d, e);
}

/** Apply one event to the draft (a replayed row may carry a type no handler knows: bad-event). */
export function handle(d: Draft, e: EngineEvent): Outcome {
  if (!handles(e.type)) return fail('bad-event', `Unknown event ${JSON.stringify(e)}`);
  return run(d, e.type, e);
}
