/**
 * Types of the pure live-session engine: events in → new state + effects out (style.md,
 * "Shape of the house"). Nothing here does IO; the hub persists, broadcasts and keeps the timers.
 */
import type { Action } from '#app/lib/automata';
import type { ChoiceSource } from '#app/lib/choice-panel';
import type { Design } from '#app/lib/design';
import type { SupergameDraws } from '#app/lib/draws';
import type { Matching } from '#app/lib/matching';

/** cancelled: opened, then called off before it started (its join code no longer works) */
export type SessionStatus = 'draft' | 'open' | 'running' | 'paused' | 'complete' | 'archived' | 'cancelled';

/** One stored choice: one seat of one pair in one round. */
export interface StoredChoice {
  sessionId: string;
  /** the engine's sequence number (shared with participant and log rows): the replay order */
  seq: number;
  supergame: number;
  round: number;
  pairId: string;
  seat: 0 | 1;
  /** null for the seat of an odd-count computer partner */
  participantId: string | null;
  action: Action;
  source: ChoiceSource;
  /** the automaton that chose, for source 'computer' or a 'computer-strategy' timeout */
  strategy: string | null;
  clientChoiceId: string | null;
  /** server time (ms since epoch) */
  at: number;
  /** ms from the round opening to this choice, paused time excluded */
  decisionMs: number;
}

/** The first join of a participant (the participants table). */
export interface ParticipantRow {
  id: string;
  pseudonym: string;
  joinedAt: number;
  seq: number;
}

/** Staff actions and re-joins, as stored in the session's small event log. */
export type LoggedEvent =
  | { type: 'open' }
  | { type: 'start' }
  | { type: 'pause' }
  | { type: 'resume' }
  | { type: 'endAfterSupergame' }
  | { type: 'endNow' }
  | { type: 'archive' }
  | { type: 'cancel' }
  | { type: 'handToComputer'; participantId: string; strategy: string }
  | { type: 'remove'; participantId: string }
  /** a participant who was handed to a computer (or is already known) joins again */
  | { type: 'join'; participantId: string }
  /**
   * After a restart or a database outage: every round still waiting for a choice gets its full time
   * again from now, so nobody is timed out for a round their phone could not answer.
   */
  | { type: 'grace' };

export interface LogRow {
  seq: number;
  at: number;
  event: LoggedEvent;
}

export type EngineEvent =
  | { type: 'open' }
  | { type: 'join'; participantId: string }
  | { type: 'start' }
  | {
      type: 'choose';
      participantId: string;
      supergame: number;
      round: number;
      action: Action;
      clientChoiceId: string;
      /** optional: the pair the phone believes it is in */
      pairId?: string;
    }
  | { type: 'timeout'; pairId: string; round: number }
  | { type: 'pause' }
  | { type: 'resume' }
  | { type: 'endAfterSupergame' }
  | { type: 'endNow' }
  | { type: 'archive' }
  | { type: 'cancel' }
  | { type: 'handToComputer'; participantId: string; strategy: string }
  | { type: 'remove'; participantId: string }
  | { type: 'reconnect'; participantId: string }
  | { type: 'disconnect'; participantId: string }
  | { type: 'grace' }
  | { type: 'tick' };

export type ErrorCode =
  | 'illegal-transition'
  | 'too-few-participants'
  | 'session-not-joinable'
  | 'session-not-running'
  | 'not-a-participant'
  | 'not-your-pair'
  | 'handed-to-computer'
  | 'round-closed'
  | 'round-not-open'
  | 'already-chosen'
  | 'already-handed'
  | 'unknown-pair'
  | 'unknown-strategy'
  | 'timer-not-due'
  | 'bad-event';

export interface EngineError {
  code: ErrorCode;
  message: string;
}

export interface ParticipantState {
  id: string;
  pseudonym: string;
  /** 0-based join order */
  joinIndex: number;
  joinedAt: number;
  /** first supergame in which this participant may be matched */
  entersAt: number;
  /**
   * active: in the pool; handed: a computer plays the seat for the rest of the current supergame,
   * then out of the pool until the participant joins again; removed: out for good.
   */
  status: 'active' | 'handed' | 'removed';
  /** times given the odd-count computer partner or sat out */
  oddCount: number;
  /** paid points revealed so far */
  points: number;
  timeouts: number;
  /** pair in the current supergame, if any */
  pairId: string | null;
  seat: 0 | 1 | null;
  /** sits out the current supergame (odd count, sit-out policy) */
  sittingOut: boolean;
  last: LastResult | null;
}

export interface LastResult {
  supergame: number;
  round: number;
  own: Action;
  partner: Action;
  ownPayoff: number;
  partnerPayoff: number;
  /** null under block termination until the block's draws are revealed */
  draw: number | null;
  drawSentence: string | null;
  /** true once the pair's supergame is over */
  supergameOver: boolean;
}

export interface ComputerSeat {
  /** library id of the automaton */
  strategy: string;
  /** its current state index */
  state: number;
  /** first round it played */
  fromRound: number;
  /** 'odd-count': the disclosed computer partner; 'hand-over': it took a participant's seat */
  reason: 'odd-count' | 'hand-over';
}

export interface Seat {
  participantId: string | null;
  computer: ComputerSeat | null;
}

export interface RoundRecord {
  round: number;
  actions: [Action, Action];
  sources: [ChoiceSource, ChoiceSource];
  payoffs: [number, number];
  draw: number;
  /** round ≤ L (block termination: rounds after the end are played, not paid) */
  paid: boolean;
  /** block termination: the block's draws have been announced */
  revealed: boolean;
  resolvedAt: number;
}

export interface PairState {
  id: string;
  supergame: number;
  index: number;
  seats: [Seat, Seat];
  /** the open round (the last round once done) */
  round: number;
  openedAt: number;
  /** null while paused or done */
  deadline: number | null;
  /** time left, kept while paused */
  remainingMs: number | null;
  /** paused time accumulated in the open round (for decision times) */
  pausedMs: number;
  pending: [StoredChoice | null, StoredChoice | null];
  rounds: RoundRecord[];
  done: boolean;
  doneAt: number | null;
}

export interface SupergameState {
  number: number;
  startedAt: number;
  draws: SupergameDraws;
  pairIds: string[];
  matching: Matching;
}

export interface SupergameSummary {
  supergame: number;
  /** L, the paid rounds */
  length: number;
  roundsPlayed: number;
  pairs: number;
  /** choices made by participants themselves (source 'player') */
  playerChoices: number;
  cooperate: number;
  round1Choices: number;
  round1Cooperate: number;
  /** cut short by "end now" */
  truncated: boolean;
}

export interface Connection {
  connected: boolean;
  since: number;
}

export interface EngineState {
  sessionId: string;
  design: Design;
  /** normalised 32-bit session seed */
  seed: number;
  status: SessionStatus;
  /** last sequence number stamped on a stored row; also the state's version */
  seq: number;
  participants: Record<string, ParticipantState>;
  /** ids in join order (pseudonym order) */
  joinOrder: string[];
  supergame: SupergameState | null;
  /** pairs of the current supergame */
  pairs: Record<string, PairState>;
  /** human pairs of finished supergames, for re-matching */
  pastPairs: [string, string][];
  summaries: SupergameSummary[];
  /** each participant's rows of the current and the previous supergame — for idempotent resubmission */
  recentChoices: Record<string, StoredChoice[]>;
  endAfterSupergame: boolean;
  pausedAt: number | null;
  startedAt: number | null;
  completedAt: number | null;
  /** connection state: volatile, not stored, not rebuilt */
  connections: Record<string, Connection>;
}

export interface ParticipantView {
  /** the tag every view carries: `session:watch` answers any of the three */
  kind: 'participant';
  sessionId: string;
  /**
   * the state's sequence number when the view was built: a view never goes back in time, so a
   * client drops one older than the view it shows (in a cluster, views of a session that just
   * changed owner may arrive out of order)
   */
  seq: number;
  participantId: string;
  pseudonym: string;
  status: 'lobby' | 'choosing' | 'waiting-partner' | 'between-supergames' | 'finished';
  sessionStatus: SessionStatus;
  paused: boolean;
  labels: { C: string; D: string };
  /** rows: own action × partner's action → (your points, partner's points) */
  payoffTable: { own: Action; partner: Action; ownPoints: number; partnerPoints: number }[];
  delta: number;
  /** "75", "87.5" */
  cutoff: string;
  termination: Design['termination'];
  supergame: number;
  supergames: number;
  round: number | null;
  pairId: string | null;
  /** never the partner's pseudonym: partners stay anonymous */
  partner: { kind: 'human' } | { kind: 'computer'; strategy: string; reason: ComputerSeat['reason']; fromRound: number } | null;
  /** this supergame's rounds so far, from this participant's side */
  history: {
    round: number;
    own: Action;
    partner: Action;
    ownPayoff: number;
    partnerPayoff: number;
    ownSource: ChoiceSource;
    draw: number | null;
    paid: boolean | null;
    sentence: string | null;
  }[];
  /** the current round's choice, once made */
  ownChoice: Action | null;
  partnerHasChosen: boolean;
  deadline: number | null;
  remainingMs: number | null;
  lastResult: LastResult | null;
  /** block termination: the latest end-of-block announcement of this supergame */
  blockNotice: string | null;
  totalPoints: number;
  notice: 'sitting-out' | 'waiting-to-enter' | 'handed-to-computer' | 'removed' | 'ended-early' | 'cancelled' | null;
}

export interface FloorSeatView {
  participantId: string | null;
  pseudonym: string | null;
  computer: ComputerSeat | null;
  hasChosen: boolean;
  source: ChoiceSource | null;
  connected: boolean | null;
  timeouts: number;
}

export interface FloorView {
  kind: 'floor';
  sessionId: string;
  /**
   * the state's sequence number when the view was built: a view never goes back in time, so a
   * client drops one older than the view it shows (in a cluster, views of a session that just
   * changed owner may arrive out of order)
   */
  seq: number;
  status: SessionStatus;
  supergame: number;
  supergames: number;
  endAfterSupergame: boolean;
  counts: { joined: number; present: number; connected: number; pairs: number; pairsDone: number };
  pairs: {
    pairId: string;
    /** the pair's number in its supergame, for people ("Pair 3") */
    number: number;
    round: number;
    done: boolean;
    seats: [FloorSeatView, FloorSeatView];
    /** when the first of the pair chose in the open round; null while neither has */
    waitingSince: number | null;
    deadline: number | null;
    remainingMs: number | null;
  }[];
  /** participants not in a pair this supergame */
  others: {
    participantId: string;
    pseudonym: string;
    why: 'waiting-to-enter' | 'sitting-out' | 'handed' | 'removed' | 'lobby';
    connected: boolean;
  }[];
  alerts: { participantId: string; pseudonym: string; kind: 'slow' | 'disconnected' }[];
  /** cooperation among players' own choices in the latest resolved round of each pair */
  currentCooperation: { choices: number; cooperate: number; rate: number | null };
}

export interface BigScreenView {
  kind: 'big-screen';
  sessionId: string;
  /**
   * the state's sequence number when the view was built: a view never goes back in time, so a
   * client drops one older than the view it shows (in a cluster, views of a session that just
   * changed owner may arrive out of order)
   */
  seq: number;
  status: SessionStatus;
  joined: number;
  supergame: number;
  supergames: number;
  pairs: number;
  pairsDone: number;
  /** draws every pair has seen so far in this supergame */
  drawsShown: number[];
  /**
   * The supergame a participant who joins now plays first (the engine admits joins while open,
   * running and paused); null when joining is closed or no supergame is left to enter.
   */
  lateEntry: number | null;
  /** the draw: a whole number from 1 to `max`; another round while it is ≤ `cutoff` */
  drawRule: { max: number; cutoff: number };
  /**
   * The latest draw every pair has seen: one round's under standard termination, a whole block's
   * under block termination. Between supergames (no pair of the new one has finished round 1),
   * the last draw of the supergame just ended. Null before the first draw.
   */
  latestDraw: {
    supergame: number;
    fromRound: number;
    toRound: number;
    draws: number[];
    /** whether the supergame goes on after these draws */
    continues: boolean;
    /** block termination: the end-of-block announcement the phones show; null otherwise */
    sentence: string | null;
  } | null;
  cooperationByRound: { round: number; choices: number; cooperate: number; rate: number | null }[];
  bySupergame: {
    supergame: number;
    length: number;
    cooperation: number | null;
    round1Cooperation: number | null;
    /** cut short by "end now" */
    truncated: boolean;
  }[];
}

export type BroadcastPayload =
  | { kind: 'participant-view'; view: ParticipantView }
  | { kind: 'floor-view'; view: FloorView }
  | { kind: 'big-screen-view'; view: BigScreenView };

export type Effect =
  /** write the row; acknowledge the choice only after the commit */
  | { type: 'persist-choice'; row: StoredChoice }
  | { type: 'persist-participant'; row: ParticipantRow }
  /** `by`: the user who caused it, when the runner writes a batch of several users' events */
  | { type: 'persist-log'; row: LogRow; by?: number | null }
  /** informational (rebuild derives it): the session row's status and current supergame */
  | { type: 'persist-session'; status: SessionStatus; supergame: number; at: number }
  /** informational: the draws of the session, stored when it opens */
  | { type: 'persist-draws'; supergames: SupergameDraws[] }
  /** informational: the pairs of a supergame, for the choice panel */
  | {
      type: 'persist-matching';
      matching: Matching;
      pairs: { pairId: string; participants: [string | null, string | null]; computerStrategy: string | null }[];
    }
  | { type: 'schedule-timer'; key: string; at: number; event: EngineEvent }
  | { type: 'cancel-timer'; key: string }
  | { type: 'broadcast'; room: string; payload: BroadcastPayload };

export interface StepOptions {
  /**
   * 'payload' (default): broadcast effects carry the participant, floor and big-screen views.
   * 'none': no views are built; `touched` says whose participant view changed, and the caller
   * builds views (the live runner builds each once per batch and the staff views a few times a
   * second; a rebuild builds none).
   */
  views?: 'payload' | 'none';
  /**
   * Steps sharing one scope (engine.ts BatchScope) write the copies made by earlier steps in
   * place: only the result of the last step is a valid state, and only if each step's input was
   * the previous step's result.
   */
  batch?: BatchScope;
}

/**
 * What is already a private copy in a run of steps (a batch of the live runner): records and
 * objects copied by an earlier step of the batch are written in place by later ones, so a batch
 * of 1,000 choices copies the 1,000-key records once, not 1,000 times. Made by newBatchScope().
 */
export interface BatchScope {
  readonly copied: Set<'participants' | 'pairs' | 'recentChoices' | 'connections'>;
  readonly clonedParticipants: Set<string>;
  readonly clonedPairs: Set<string>;
}

export interface StepResult {
  state: EngineState;
  effects: Effect[];
  error?: EngineError;
  /** the stored row for a choice (new, or the earlier one on 'already-chosen') */
  row?: StoredChoice;
  /** participants whose own view changed in this step (empty on an error or a quiet tick) */
  touched: readonly string[];
}
