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
 */
import { type Action, type Automaton, libraryStrategy, LIBRARY, profileOf } from '#app/lib/automata';
import { computerStrategyOf, type Design } from '#app/lib/design';
import { describeDraw, drawSequence, supergameDraws } from '#app/lib/draws';
import { matchSupergame } from '#app/lib/matching';
import { normaliseSeed, type Seed } from '#app/lib/rng';
import { profilePoints } from '#app/lib/stage-game';
import type {
  BatchScope,
  ChoiceRow,
  ChoiceSource,
  Effect,
  EngineError,
  EngineEvent,
  EngineState,
  ErrorCode,
  LoggedEvent,
  PairState,
  ParticipantState,
  RoundRecord,
  SessionStatus,
  StepOptions,
  StepResult,
  SupergameSummary,
} from './types';
import { bigScreenView, floorView, participantView } from './views';

/** A timer may fire this much early (clock granularity) and still count. */
const TIMER_TOLERANCE_MS = 100;

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

export function pseudonymFor(joinIndex: number): string {
  return `P-${String(joinIndex + 1).padStart(3, '0')}`;
}

export function timerKey(sessionId: string, pairId: string, round: number): string {
  return `${sessionId}:${pairId}:${round}`;
}

export function roomOf(kind: 'session' | 'staff' | 'participant', sessionId: string, participantId?: string): string {
  return kind === 'participant' ? `participant:${sessionId}:${participantId}` : `${kind}:${sessionId}`;
}

/** The state an automaton reaches after a history, following observed actions (methods.md §3). */
export function automatonStateAfter(a: Automaton, own: readonly Action[], partner: readonly Action[]): number {
  let s = 0;
  for (let t = 0; t < own.length; t++) s = a.states[s].next[profileOf(own[t], partner[t])];
  return s;
}

const isStrategy = (id: string): boolean => LIBRARY.some((a) => a.id === id);

/**
 * Copy-on-write working copy of the state for one step. The big records (participants, pairs,
 * recent choices, connections) are copied only when first written: copying 1000-key records on every
 * choice dominated the cost of a step in a large session.
 */
type RecordKey = 'participants' | 'pairs' | 'recentChoices' | 'connections';

/**
 * A scope for a batch of steps (see BatchScope in types.ts). The state the batch started from is
 * still never mutated. Handlers check before they write, so a step that fails leaves the batch's
 * copies as they were (tests/unit/engine.test.ts checks a batch against single steps).
 */
export function newBatchScope(): BatchScope {
  return { copied: new Set<RecordKey>(), clonedParticipants: new Set<string>(), clonedPairs: new Set<string>() };
}

class Draft {
  s: EngineState;
  private copied: Set<RecordKey>;
  private clonedParticipants: Set<string>;
  private clonedPairs: Set<string>;
  persists: Effect[] = [];
  timers: Effect[] = [];
  touched = new Set<string>();
  touchAll = false;
  row: ChoiceRow | undefined;

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

const fail = (code: ErrorCode, message: string): EngineError => ({ code, message });

function transition(d: Draft, allowed: SessionStatus[], to: SessionStatus, what: string): EngineError | null {
  if (!allowed.includes(d.s.status)) {
    return fail('illegal-transition', `Cannot ${what} a session that is ${d.s.status}`);
  }
  d.s.status = to;
  return null;
}

const roundMs = (d: Draft): number => d.s.design.roundSeconds * 1000;

/** Pairs whose supergame is still being played. */
function openPairIds(s: EngineState): string[] {
  return (s.supergame?.pairIds ?? []).filter((id) => !s.pairs[id].done);
}

function scheduleTimer(d: Draft, pair: PairState): void {
  if (pair.deadline === null) return;
  d.timers.push({
    type: 'schedule-timer',
    key: timerKey(d.s.sessionId, pair.id, pair.round),
    at: pair.deadline,
    event: { type: 'timeout', pairId: pair.id, round: pair.round },
  });
}

function cancelTimer(d: Draft, pair: PairState): void {
  d.timers.push({ type: 'cancel-timer', key: timerKey(d.s.sessionId, pair.id, pair.round) });
}

function openRound(d: Draft, pair: PairState, round: number, at: number): void {
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

function addRow(
  d: Draft,
  pair: PairState,
  seat: 0 | 1,
  action: Action,
  source: ChoiceSource,
  strategy: string | null,
  clientChoiceId: string | null,
  at: number,
): ChoiceRow {
  const participantId = pair.seats[seat].participantId;
  const elapsed = at - pair.openedAt - pair.pausedMs - (d.s.pausedAt !== null ? at - Math.max(d.s.pausedAt, pair.openedAt) : 0);
  const row: ChoiceRow = {
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
function reveal(d: Draft, pair: PairState, fromRound: number, toRound: number): void {
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
  const [a, b] = pair.pending as [ChoiceRow, ChoiceRow];
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
function advancePair(d: Draft, pairId: string, at: number): void {
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

function summarise(s: EngineState, truncated: boolean): SupergameSummary {
  const sg = s.supergame!;
  let playerChoices = 0;
  let cooperate = 0;
  let round1Choices = 0;
  let round1Cooperate = 0;
  for (const id of sg.pairIds) {
    for (const rec of s.pairs[id].rounds) {
      rec.sources.forEach((src, i) => {
        if (src !== 'player') return;
        playerChoices++;
        if (rec.actions[i] === 'C') cooperate++;
        if (rec.round === 1) {
          round1Choices++;
          if (rec.actions[i] === 'C') round1Cooperate++;
        }
      });
    }
  }
  return {
    supergame: sg.number,
    length: sg.draws.length,
    roundsPlayed: sg.draws.roundsPlayed,
    pairs: sg.pairIds.length,
    playerChoices,
    cooperate,
    round1Choices,
    round1Cooperate,
    truncated,
  };
}

function beginSupergame(d: Draft, number: number, at: number): void {
  const s = d.s;
  const design = s.design;
  const pool = s.joinOrder.filter((id) => {
    const p = s.participants[id];
    return p.status === 'active' && p.entersAt <= number;
  });
  const oddCounts: Record<string, number> = {};
  for (const id of pool) oddCounts[id] = s.participants[id].oddCount;
  // s.pairs still holds the supergame just played: nobody meets that partner again when avoidable
  const lastPairs = Object.values(s.pairs).flatMap((pair): [string, string][] => {
    const [x, y] = pair.seats;
    return x.participantId && y.participantId ? [[x.participantId, y.participantId]] : [];
  });
  const matching = matchSupergame({
    supergame: number,
    participants: pool,
    pastPairs: s.pastPairs,
    lastPairs,
    oddCounts,
    policy: design.oddCount,
    seed: s.seed,
  });
  for (const id of s.joinOrder) {
    const p = s.participants[id];
    if (p.pairId !== null || p.sittingOut) {
      const q = d.p(id);
      q.pairId = null;
      q.seat = null;
      q.sittingOut = false;
    }
  }
  // rows of the supergame before the previous one are no longer needed for idempotent retries
  const recent = d.w('recentChoices');
  for (const [id, rows] of Object.entries(recent)) {
    const keep = rows.filter((r) => r.supergame >= number - 1);
    if (keep.length === 0) delete recent[id];
    else if (keep.length !== rows.length) recent[id] = keep;
  }
  d.replace('pairs', {});
  const pairIds: string[] = [];
  const persisted: { pairId: string; participants: [string | null, string | null]; computerStrategy: string | null }[] = [];
  const newPair = (id: string, index: number, seats: PairState['seats']): void => {
    s.pairs[id] = {
      id,
      supergame: number,
      index,
      seats,
      round: 1,
      openedAt: at,
      deadline: null,
      remainingMs: null,
      pausedMs: 0,
      pending: [null, null],
      rounds: [],
      done: false,
      doneAt: null,
    };
    pairIds.push(id);
    seats.forEach((seat, i) => {
      if (!seat.participantId) return;
      const q = d.p(seat.participantId);
      q.pairId = id;
      q.seat = i as 0 | 1;
    });
    persisted.push({
      pairId: id,
      participants: [seats[0].participantId, seats[1].participantId],
      computerStrategy: seats[1].computer?.strategy ?? null,
    });
  };
  matching.pairs.forEach(([a, b], i) => {
    newPair(`s${number}-p${i + 1}`, i + 1, [
      { participantId: a, computer: null },
      { participantId: b, computer: null },
    ]);
  });
  if (matching.odd) {
    const q = d.p(matching.odd.participantId);
    q.oddCount += 1;
    if (matching.odd.kind === 'sit-out') {
      q.sittingOut = true;
    } else {
      const index = matching.pairs.length + 1;
      newPair(`s${number}-p${index}`, index, [
        { participantId: matching.odd.participantId, computer: null },
        {
          participantId: null,
          computer: { strategy: matching.odd.strategy ?? 'TFT', state: 0, fromRound: 1, reason: 'odd-count' },
        },
      ]);
    }
  }
  s.supergame = {
    number,
    startedAt: at,
    draws: supergameDraws(s.seed, design.delta, number, design.termination),
    pairIds,
    matching,
  };
  d.persists.push({ type: 'persist-matching', matching, pairs: persisted });
  d.session(at);
  for (const id of pairIds) {
    openRound(d, s.pairs[id], 1, at);
    advancePair(d, id, at);
  }
}

function completeSession(d: Draft, at: number): void {
  d.s.status = 'complete';
  d.s.completedAt = at;
  d.s.pausedAt = null;
  d.session(at);
}

/** After any change: while every pair of the supergame is done, move to the next one (or finish). */
function settle(d: Draft): void {
  const s = d.s;
  while ((s.status === 'running' || s.status === 'paused') && s.supergame && openPairIds(s).length === 0) {
    const sg = s.supergame;
    const boundary = Math.max(sg.startedAt, ...sg.pairIds.map((id) => s.pairs[id].doneAt ?? sg.startedAt));
    s.summaries = [...s.summaries, summarise(s, false)];
    const humanPairs: [string, string][] = [];
    for (const id of sg.pairIds) {
      const [x, y] = s.pairs[id].seats;
      if (x.participantId && y.participantId) humanPairs.push([x.participantId, y.participantId]);
    }
    s.pastPairs = [...s.pastPairs, ...humanPairs];
    if (sg.number >= s.design.supergames || s.endAfterSupergame) {
      completeSession(d, boundary);
      return;
    }
    beginSupergame(d, sg.number + 1, boundary);
  }
}

function findParticipant(d: Draft, id: string): ParticipantState | EngineError {
  const p = d.s.participants[id];
  if (!p || p.status === 'removed') return fail('not-a-participant', `"${id}" is not a participant of this session`);
  return p;
}

function handOver(d: Draft, participantId: string, strategy: string): void {
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

function applyTimeout(d: Draft, pairId: string, round: number): EngineError | null {
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

function handle(d: Draft, e: EngineEvent): EngineError | { alreadyChosen: ChoiceRow } | null {
  const s = d.s;
  switch (e.type) {
    case 'open': {
      const err = transition(d, ['draft'], 'open', 'open');
      if (err) return err;
      d.log({ type: 'open' });
      d.session(d.now);
      d.persists.push({
        type: 'persist-draws',
        supergames: drawSequence(s.seed, s.design.delta, s.design.supergames, s.design.termination).supergames,
      });
      return null;
    }
    case 'join': {
      if (!['open', 'running', 'paused'].includes(s.status)) {
        return fail('session-not-joinable', `The session is ${s.status}`);
      }
      const entersAt = s.status === 'open' ? 1 : (s.supergame?.number ?? 0) + 1;
      const known = s.participants[e.participantId];
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
    }
    case 'start': {
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
    }
    case 'pause': {
      const err = transition(d, ['running'], 'paused', 'pause');
      if (err) return err;
      s.pausedAt = d.now;
      for (const id of openPairIds(s)) {
        const pair = d.pair(id);
        if (pair.deadline !== null) pair.remainingMs = Math.max(0, pair.deadline - d.now);
        pair.deadline = null;
        cancelTimer(d, pair);
      }
      d.log({ type: 'pause' });
      d.session(d.now);
      return null;
    }
    case 'resume': {
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
      d.log({ type: 'resume' });
      d.session(d.now);
      return null;
    }
    case 'endAfterSupergame': {
      if (s.status !== 'running' && s.status !== 'paused') {
        return fail('illegal-transition', `Cannot end a session that is ${s.status}`);
      }
      if (s.endAfterSupergame) return null;
      s.endAfterSupergame = true;
      d.log({ type: 'endAfterSupergame' });
      d.session(d.now);
      return null;
    }
    case 'endNow': {
      if (s.status !== 'running' && s.status !== 'paused') {
        return fail('illegal-transition', `Cannot end a session that is ${s.status}`);
      }
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
    }
    case 'archive': {
      const err = transition(d, ['complete'], 'archived', 'archive');
      if (err) return err;
      d.log({ type: 'archive' });
      d.session(d.now);
      return null;
    }
    case 'cancel': {
      // Only before the start: nothing has been played, so nothing is lost; the lobby's phones
      // are told, and the join code stops working (it admits open, running and paused sessions).
      const err = transition(d, ['open'], 'cancelled', 'cancel');
      if (err) return err;
      d.s.completedAt = d.now;
      d.log({ type: 'cancel' });
      d.session(d.now);
      return null;
    }
    case 'handToComputer': {
      if (s.status !== 'running' && s.status !== 'paused') {
        return fail('session-not-running', `The session is ${s.status}`);
      }
      if (!isStrategy(e.strategy)) return fail('unknown-strategy', `No strategy "${e.strategy}" in the library`);
      const p = findParticipant(d, e.participantId);
      if ('code' in p) return p;
      if (p.status === 'handed') return fail('already-handed', `${p.pseudonym} is already played by a computer`);
      d.p(p.id).status = 'handed';
      d.log({ type: 'handToComputer', participantId: p.id, strategy: e.strategy });
      handOver(d, p.id, e.strategy);
      settle(d);
      return null;
    }
    case 'remove': {
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
    }
    case 'choose': {
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
    }
    case 'timeout': {
      const err = applyTimeout(d, e.pairId, e.round);
      if (err) return err;
      settle(d);
      return null;
    }
    case 'grace': {
      if (s.status !== 'running' && s.status !== 'paused') return null;
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
    }
    case 'tick': {
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
    }
    case 'reconnect':
    case 'disconnect': {
      if (!s.participants[e.participantId]) return fail('not-a-participant', `"${e.participantId}" is not a participant`);
      d.w('connections')[e.participantId] = { connected: e.type === 'reconnect', since: d.now };
      d.touched.add(e.participantId);
      return null;
    }
    default:
      return fail('bad-event', `Unknown event ${JSON.stringify(e)}`);
  }
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
