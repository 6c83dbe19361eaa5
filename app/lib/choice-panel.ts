/**
 * The one rule that turns a session's stored rows into choice-panel rows (product.md, "Data";
 * columns in app/lib/panel-codebook.ts; docs/decisions/026). Pure: the paged reader
 * (app/models/panel-export.server.ts) feeds it page by page, `sessionPanel` feeds it a whole
 * session held in memory (unit tests, the agreement test), and both give the same rows.
 *
 * - One row per participant × supergame × round in which both seats of the pair chose. A round
 *   only one seat chose in (the session still running, or ended by "End now") is half-finished:
 *   it has no partner action and no payoff, so it is not a row; it is counted instead.
 * - Every row keeps where its choice came from (`origin`): the participant's own choice, the
 *   design's timeout rule, a computer playing the participant's seat after a hand-over, or a round
 *   played after the supergame ended under block termination (unpaid). Analyses use own, paid
 *   choices unless asked for all (`inAnalysis`).
 * - The partner is what the participant faced: another pseudonym, or `computer:<strategy>` in a
 *   round where a computer chose for the partner's seat (odd count, or the partner handed over).
 */
import type { Action } from './automata';
import type { ChoiceRow } from './panel';
import { stagePayoff, type StageGame } from './stage-game';

/** Who made a stored choice: the participant, the design's timeout rule, or a computer seat. */
export const CHOICE_SOURCES = ['player', 'timeout', 'computer'] as const;
export type ChoiceSource = (typeof CHOICE_SOURCES)[number];

/** Where a choice came from; `own` is the participant's own choice in a paid round. */
export const ORIGINS = ['own', 'timeout', 'computer_seat', 'unpaid_round'] as const;
export type Origin = (typeof ORIGINS)[number];

/** Which choices an analysis uses: own, paid choices (the default) or every origin. */
export const INCLUDES = ['own', 'all'] as const;
export type Include = (typeof INCLUDES)[number];

export interface PanelRow {
  session: number;
  treatment: string;
  R: number;
  S: number;
  T: number;
  P: number;
  delta: number;
  pseudonym: string;
  partner: string;
  supergame: number;
  round: number;
  action: Action;
  partner_action: Action;
  payoff: number;
  source: ChoiceSource;
  decision_ms: number;
  /** null only if the session's draws were never stored (not for sessions the engine ran) */
  draw: number | null;
  supergame_length: number | null;
  timestamp: string;
  /** 1 when round ≤ supergame_length (the round counts toward points), else 0 */
  paid: 0 | 1;
  origin: Origin;
  partner_source: ChoiceSource;
  /** 1 when a computer chose for the partner's seat in some round of this supergame */
  computer_partner: 0 | 1;
}

/** One stored seat-round (the `choices` table's columns the panel needs). */
export interface StoredChoice {
  supergame: number;
  round: number;
  pairId: string;
  seat: number;
  /** null for the seat of an odd-count computer partner */
  participantKey: string | null;
  action: Action;
  source: ChoiceSource;
  strategy: string | null;
  decisionMs: number;
  atMs: number;
}

/** What the rule needs to know about the session, once per session. */
export interface PanelContext {
  session: { id: number; treatment: string; payoffs: StageGame; delta: number };
  /** participant key → pseudonym */
  pseudonyms: ReadonlyMap<string, string>;
  draws: ReadonlyMap<number, { draws: readonly number[]; length: number }>;
  /** `seatKey` of every seat a computer chose in (at least once) */
  computerSeats: ReadonlySet<string>;
}

export const seatKey = (supergame: number, pairId: string, seat: number) => `${supergame}/${pairId}/${seat}`;

/** A half-finished round: one seat chose, the other never did. */
export interface UnfinishedRound {
  pseudonym: string;
  supergame: number;
  round: number;
}

export function originOf(source: ChoiceSource, paid: boolean): Origin {
  // Source: Fréchette & Yuksel (2017): under block termination the rounds after the supergame's
  // real end are played but not paid, so they are not part of the game the theory describes.
  if (!paid) return 'unpaid_round';
  if (source === 'timeout') return 'timeout';
  if (source === 'computer') return 'computer_seat';
  return 'own';
}

/** Whether a row enters cooperation figures and estimation. */
export const inAnalysis = (row: Pick<PanelRow, 'origin'>, include: Include) => include === 'all' || row.origin === 'own';

/**
 * The pure step: one participant's stored choice and the partner seat's choice of the same round
 * (null when the partner never chose) → a panel row, or null for a half-finished round.
 */
export function panelRowOf(
  ctx: PanelContext,
  pseudonym: string,
  own: StoredChoice,
  partner: Pick<StoredChoice, 'participantKey' | 'action' | 'source' | 'strategy'> | null,
): PanelRow | null {
  if (!partner) return null;
  const { session } = ctx;
  const d = ctx.draws.get(own.supergame);
  const paid = d ? own.round <= d.length : true;
  const partnerName =
    partner.participantKey === null || partner.source === 'computer'
      ? `computer:${partner.strategy ?? 'unknown'}`
      : (ctx.pseudonyms.get(partner.participantKey) ?? 'unknown');
  return {
    session: session.id,
    treatment: session.treatment,
    R: session.payoffs.R,
    S: session.payoffs.S,
    T: session.payoffs.T,
    P: session.payoffs.P,
    delta: session.delta,
    pseudonym,
    partner: partnerName,
    supergame: own.supergame,
    round: own.round,
    action: own.action,
    partner_action: partner.action,
    payoff: stagePayoff(session.payoffs, own.action, partner.action),
    source: own.source,
    decision_ms: own.decisionMs,
    draw: d?.draws[own.round - 1] ?? null,
    supergame_length: d?.length ?? null,
    timestamp: new Date(own.atMs).toISOString(),
    // the codebook's order (JSON and the API keep it): the columns added with origins come last
    paid: paid ? 1 : 0,
    origin: originOf(own.source, paid),
    partner_source: partner.source,
    computer_partner: ctx.computerSeats.has(seatKey(own.supergame, own.pairId, 1 - own.seat)) ? 1 : 0,
  };
}

/** The seats a computer chose in (odd-count partners and hand-overs). */
export function computerSeatsOf(choices: Iterable<Pick<StoredChoice, 'supergame' | 'pairId' | 'seat' | 'source'>>): Set<string> {
  const out = new Set<string>();
  for (const c of choices) if (c.source === 'computer') out.add(seatKey(c.supergame, c.pairId, c.seat));
  return out;
}

const NUMBER = /(\d+)/;

/** Pseudonyms in numeric order: P-2 before P-10, P-999 before P-1000 (then as text). */
export function comparePseudonyms(a: string, b: string): number {
  const x = NUMBER.exec(a);
  const y = NUMBER.exec(b);
  if (x && y && a.slice(0, x.index) === b.slice(0, y.index)) {
    const d = Number(x[1]) - Number(y[1]);
    if (d !== 0) return d;
  }
  return a < b ? -1 : a > b ? 1 : 0;
}

/** A session's stored rows, all at once (the tables' shapes). */
export interface StoredSession {
  session: PanelContext['session'];
  participants: { participantKey: string; pseudonym: string; consent: number | null }[];
  choices: StoredChoice[];
  draws: { supergame: number; draws: number[]; length: number }[];
}

/**
 * The whole panel of a session held in memory, by the same row rule as the paged reader: rows in
 * numeric pseudonym order, then supergame and round; participants who declined research consent
 * (consent = 0) left out unless `keepDeclined`.
 */
export function sessionPanel(
  stored: StoredSession,
  opts: { keepDeclined?: boolean } = {},
): { rows: PanelRow[]; unfinished: UnfinishedRound[] } {
  const ctx: PanelContext = {
    session: stored.session,
    pseudonyms: new Map(stored.participants.map((p) => [p.participantKey, p.pseudonym])),
    draws: new Map(stored.draws.map((d) => [d.supergame, d])),
    computerSeats: computerSeatsOf(stored.choices),
  };
  const bySeat = new Map(stored.choices.map((c) => [seatKey(c.supergame, c.pairId, c.seat) + '/' + c.round, c]));
  const people = stored.participants
    .filter((p) => opts.keepDeclined || p.consent !== 0)
    .sort((a, b) => comparePseudonyms(a.pseudonym, b.pseudonym));
  const rows: PanelRow[] = [];
  const unfinished: UnfinishedRound[] = [];
  for (const p of people) {
    const mine = stored.choices
      .filter((c) => c.participantKey === p.participantKey)
      .sort((a, b) => a.supergame - b.supergame || a.round - b.round);
    for (const c of mine) {
      const partner = bySeat.get(seatKey(c.supergame, c.pairId, 1 - c.seat) + '/' + c.round) ?? null;
      const row = panelRowOf(ctx, p.pseudonym, c, partner);
      if (row) rows.push(row);
      else unfinished.push({ pseudonym: p.pseudonym, supergame: c.supergame, round: c.round });
    }
  }
  return { rows, unfinished };
}

/** What an analysis left out, by origin, beside what it used. */
export interface OriginCounts {
  used: number;
  timeout: number;
  computer_seat: number;
  unpaid_round: number;
}

export function originCounts(rows: Iterable<Pick<PanelRow, 'origin'>>, include: Include): OriginCounts {
  const out: OriginCounts = { used: 0, timeout: 0, computer_seat: 0, unpaid_round: 0 };
  for (const r of rows) {
    if (inAnalysis(r, include)) out.used++;
    else out[r.origin as Exclude<Origin, 'own'>]++;
  }
  return out;
}

/** The rows an estimation uses, in app/lib/panel.ts's shape, and what it left out. */
export interface EstimationRows {
  rows: ChoiceRow[];
  counts: OriginCounts;
  /** own, paid choices left out because an earlier choice of the same supergame was */
  afterLeftOut: number;
}

/**
 * For strategy-frequency estimation: each participant's supergame up to (not including) its first
 * choice `include` leaves out. A strategy's prediction in round t depends on the history of rounds
 * 1…t−1, so a supergame cannot skip a round in the middle; cutting it at the first choice that is
 * not the participant's own keeps every remaining prediction exact (the likelihood of the prefix,
 * Dal Bó & Fréchette 2011's model). Rows must come in the panel's order (participant, supergame,
 * round), as the reader gives them.
 */
export function estimationRows(panel: readonly PanelRow[], include: Include): EstimationRows {
  const rows: ChoiceRow[] = [];
  const counts = originCounts(panel, include);
  let afterLeftOut = 0;
  let cut = '';
  for (const r of panel) {
    const at = `${r.session}/${r.pseudonym}/${r.supergame}`;
    if (cut === at) {
      if (inAnalysis(r, include)) afterLeftOut++;
      continue;
    }
    if (!inAnalysis(r, include)) {
      cut = at;
      continue;
    }
    rows.push({
      session: String(r.session),
      treatment: r.treatment,
      subject: r.pseudonym,
      partner: r.partner,
      supergame: r.supergame,
      round: r.round,
      action: r.action,
      partnerAction: r.partner_action,
    });
  }
  counts.used -= afterLeftOut;
  return { rows, counts, afterLeftOut };
}
