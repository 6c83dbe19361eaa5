/**
 * Rounds of one pair: timers, choices (rows), the timeout rule, resolution and reveal, computer
 * seats and hand-overs.
 */
import { type Action, type Automaton, libraryStrategy, LIBRARY, profileOf } from '#app/lib/automata';
import type { ChoiceSource } from '#app/lib/choice-panel';
import { computerStrategyOf } from '#app/lib/design';
import { describeDraw } from '#app/lib/draws';
import { profilePoints } from '#app/lib/stage-game';
import { type Draft, fail, roundMs, timerKey } from './draft';
import type { EngineError, PairState, ParticipantState, RoundRecord, StoredChoice } from './types';

/** A timer may fire this much early (clock granularity) and still count. */
const TIMER_TOLERANCE_MS = 100;

/** The state an automaton reaches after a history, following observed actions (methods.md §3). */
export function automatonStateAfter(a: Automaton, own: readonly Action[], partner: readonly Action[]): number {
  let s = 0;
  for (let t = 0; t < own.length; t++) s = a.states[s].next[profileOf(own[t], partner[t])];
  return s;
}

export const isStrategy = (id: string): boolean => LIBRARY.some((a) => a.id === id);

export function scheduleTimer(d: Draft, pair: PairState): void {
  if (pair.deadline === null) return;
  d.timers.push({
    type: 'schedule-timer',
    key: timerKey(d.s.sessionId, pair.id, pair.round),
    at: pair.deadline,
    event: { type: 'timeout', pairId: pair.id, round: pair.round },
  });
}

export function cancelTimer(d: Draft, pair: PairState): void {
  d.timers.push({ type: 'cancel-timer', key: timerKey(d.s.sessionId, pair.id, pair.round) });
}

export function openRound(d: Draft, pair: PairState, round: number, at: number): void {
  pair.round = round;
  pair.openedAt = at;
  pair.pending = [null, null];
  pair.pausedMs = 0;
  if (d.s.status === 'paused') {
    pair.deadline = null;
    pair.remainingMs = roundMs(d);
  } else {
    pair.deadline = at + roundMs(d);
    pair.remainingMs = null;
  }
}

export function addRow(
  d: Draft,
  pair: PairState,
  seat: 0 | 1,
  action: Action,
  source: ChoiceSource,
  strategy: string | null,
  clientChoiceId: string | null,
  at: number,
): StoredChoice {
  const participantId = pair.seats[seat].participantId;
  const elapsed = at - pair.openedAt - pair.pausedMs - (d.s.pausedAt !== null ? at - Math.max(d.s.pausedAt, pair.openedAt) : 0);
  const row: StoredChoice = {
    sessionId: d.s.sessionId,
    seq: d.nextSeq(),
    supergame: pair.supergame,
    round: pair.round,
    pairId: pair.id,
    seat,
    participantId,
    action,
    source,
    strategy,
    clientChoiceId,
    at,
    decisionMs: Math.max(0, elapsed),
  };
  pair.pending[seat] = row;
  if (participantId) d.w('recentChoices')[participantId] = [...(d.s.recentChoices[participantId] ?? []), row];
  d.persists.push({ type: 'persist-choice', row });
  return row;
}

function ownHistory(pair: PairState, seat: 0 | 1): { own: Action[]; partner: Action[] } {
  return {
    own: pair.rounds.map((r) => r.actions[seat]),
    partner: pair.rounds.map((r) => r.actions[seat === 0 ? 1 : 0]),
  };
}

/** What the design's timeout rule plays for a seat (product.md, "Play"). */
function timeoutAction(d: Draft, pair: PairState, seat: 0 | 1): { action: Action; strategy: string | null } {
  switch (d.s.design.timeout) {
    case 'defect':
      return { action: 'D', strategy: null };
    case 'cooperate':
      return { action: 'C', strategy: null };
    case 'repeat-last': {
      const last = pair.rounds[pair.rounds.length - 1];
      return { action: last ? last.actions[seat] : 'C', strategy: null };
    }
    case 'computer-strategy': {
      const a = libraryStrategy(computerStrategyOf(d.s.design));
      const h = ownHistory(pair, seat);
      return { action: a.states[automatonStateAfter(a, h.own, h.partner)].action, strategy: a.id };
    }
  }
}

/** Reveal a block's rounds (block termination) or a single round, crediting paid points. */
export function reveal(d: Draft, pair: PairState, fromRound: number, toRound: number): void {
  for (const rec of pair.rounds) {
    if (rec.round < fromRound || rec.round > toRound || rec.revealed) continue;
    rec.revealed = true;
    if (!rec.paid) continue;
    pair.seats.forEach((seat, i) => {
      // Rounds a computer played in a participant's seat after a hand-over are not that
      // participant's: they earn them nothing (docs/decisions/030). Timeouts still count.
      if (seat.participantId && rec.sources[i] !== 'computer') d.p(seat.participantId).points += rec.payoffs[i];
    });
  }
}

function resolveRound(d: Draft, pair: PairState): number {
  const [a, b] = pair.pending as [StoredChoice, StoredChoice];
  const sg = d.s.supergame!;
  const design = d.s.design;
  const actions: [Action, Action] = [a.action, b.action];
  const draw = sg.draws.draws[pair.round - 1];
  // resolution time comes from the stored rows, not from whichever process saw the second one
  const resolvedAt = Math.max(a.at, b.at);
  const rec: RoundRecord = {
    round: pair.round,
    actions,
    sources: [a.source, b.source],
    payoffs: profilePoints(design.payoffs, actions[0], actions[1]),
    draw,
    paid: pair.round <= sg.draws.length,
    revealed: false,
    resolvedAt,
  };
  pair.rounds.push(rec);
  cancelTimer(d, pair);
  pair.seats.forEach((seat, i) => {
    if (seat.computer) {
      const auto = libraryStrategy(seat.computer.strategy);
      // methods.md §3: automata follow the observed actions, own first
      seat.computer.state = auto.states[seat.computer.state].next[profileOf(actions[i], actions[1 - i])];
    }
  });
  const term = design.termination;
  const over = pair.round >= sg.draws.roundsPlayed;
  if (term.kind === 'standard') {
    reveal(d, pair, pair.round, pair.round);
  } else if (pair.round % term.k === 0 || over) {
    reveal(d, pair, pair.round - ((pair.round - 1) % term.k), pair.round);
  }
  pair.seats.forEach((seat, i) => {
    if (!seat.participantId) return;
    const o = i === 0 ? 1 : 0;
    d.p(seat.participantId).last = {
      supergame: pair.supergame,
      round: pair.round,
      own: actions[i],
      partner: actions[o],
      ownPayoff: rec.payoffs[i],
      partnerPayoff: rec.payoffs[o],
      draw: rec.revealed ? draw : null,
      drawSentence: rec.revealed && term.kind === 'standard' ? describeDraw(draw, design.delta) : null,
      supergameOver: over,
    };
  });
  pair.deadline = null;
  pair.remainingMs = null;
  if (over) {
    pair.done = true;
    pair.doneAt = resolvedAt;
  }
  return resolvedAt;
}

/** Let computer seats choose, resolve complete rounds, open the next ones; arm the timer if waiting. */
export function advancePair(d: Draft, pairId: string, at: number): void {
  const pair = d.pair(pairId);
  let t = at;
  for (;;) {
    if (pair.done) return;
    pair.seats.forEach((seat, i) => {
      if (seat.computer && !pair.pending[i]) {
        const auto = libraryStrategy(seat.computer.strategy);
        addRow(d, pair, i as 0 | 1, auto.states[seat.computer.state].action, 'computer', auto.id, null, t);
      }
    });
    if (pair.pending[0] && pair.pending[1]) {
      t = resolveRound(d, pair);
      if (!pair.done) openRound(d, pair, pair.round + 1, t);
      continue;
    }
    if (d.s.status === 'running') scheduleTimer(d, pair);
    return;
  }
}

export function findParticipant(d: Draft, id: string): ParticipantState | EngineError {
  const p = d.s.participants[id];
  if (!p || p.status === 'removed') return fail('not-a-participant', `"${id}" is not a participant of this session`);
  return p;
}

export function handOver(d: Draft, participantId: string, strategy: string): void {
  const p = d.s.participants[participantId];
  if (!p.pairId) return;
  const pair = d.pair(p.pairId);
  if (pair.done || p.seat === null) return;
  const seat = pair.seats[p.seat];
  if (seat.computer) return;
  const auto = libraryStrategy(strategy);
  const h = ownHistory(pair, p.seat);
  seat.computer = {
    strategy,
    state: automatonStateAfter(auto, h.own, h.partner),
    fromRound: pair.round,
    reason: 'hand-over',
  };
  // Both phones change: the partner is told about the computer (no deception), the seat's owner
  // that a computer took over.
  for (const st of pair.seats) if (st.participantId) d.touched.add(st.participantId);
  advancePair(d, pair.id, d.now);
}

export function applyTimeout(d: Draft, pairId: string, round: number): EngineError | null {
  const s = d.s;
  if (s.status !== 'running') return fail('session-not-running', `The session is ${s.status}`);
  const existing = s.pairs[pairId];
  if (!existing) return fail('unknown-pair', `No pair "${pairId}" in the current supergame`);
  if (existing.done || round < existing.round) return fail('round-closed', `Round ${round} of ${pairId} is closed`);
  if (round > existing.round) return fail('round-not-open', `Round ${round} of ${pairId} is not open`);
  if (existing.pending[0] && existing.pending[1]) return fail('round-closed', `Round ${round} of ${pairId} is complete`);
  if (existing.deadline !== null && d.now < existing.deadline - TIMER_TOLERANCE_MS) {
    return fail('timer-not-due', `The timer of ${pairId} round ${round} is due at ${existing.deadline}`);
  }
  const pair = d.pair(pairId);
  for (const seat of [0, 1] as const) {
    if (pair.pending[seat]) continue;
    const { action, strategy } = timeoutAction(d, pair, seat);
    addRow(d, pair, seat, action, 'timeout', strategy, null, d.now);
    const pid = pair.seats[seat].participantId;
    if (pid) d.p(pid).timeouts += 1;
  }
  advancePair(d, pairId, d.now);
  return null;
}
