/**
 * The Debrief's numbers from a session's panel rows (product.md "Debrief"): cooperation by
 * supergame and by round, outcome shares, realised lengths against the geometric law, points.
 * Pure: the loaders, the CSV downloads and the projector all chart exactly these.
 */
import { comparePseudonyms, type Include, inAnalysis, type OriginCounts, originCounts, type PanelRow } from './choice-panel';
import { geometricLengthGof, type GofResult } from './gof';
import type { StageGame } from './stage-game';
import { theoryAt } from './thresholds';

/** The columns of a choice-panel row the Debrief reads (app/lib/choice-panel.ts makes them). */
export type DebriefRow = Pick<
  PanelRow,
  'pseudonym' | 'supergame' | 'round' | 'action' | 'partner_action' | 'payoff' | 'paid' | 'origin' | 'computer_partner' | 'supergame_length'
>;

export interface RateCell {
  /** choices counted (a participant's choice in a round) */
  n: number;
  cooperate: number;
  /** cooperate / n, null when n = 0 */
  rate: number | null;
}

const cell = (n: number, cooperate: number): RateCell => ({ n, cooperate, rate: n ? cooperate / n : null });

export interface SupergameRow {
  supergame: number;
  length: number;
  all: RateCell;
  round1: RateCell;
  /** shares of participant-rounds in which both chose C, exactly one did, neither did */
  outcomes: { both: number; one: number; none: number; n: number };
}

export interface RoundRow {
  round: number;
  /** supergames that reached this round */
  supergames: number;
  all: RateCell;
}

export interface PointsRow {
  subject: string;
  points: number;
}

export interface LengthFit {
  lengths: { supergame: number; length: number }[];
  /** observed and expected counts per length k = 1…max (expected = n(1−δ)δ^(k−1)) */
  histogram: { k: number; observed: number; expected: number }[];
  /** Pearson χ² with δ known, or why it cannot be run */
  test: { ok: true; result: GofResult } | { ok: false; message: string };
}

export interface SessionDebrief {
  delta: number;
  /** which choices the cooperation figures use: own, paid ones (default) or every origin */
  include: Include;
  /** choices used, and those left out by origin */
  counts: OriginCounts;
  /** of the choices used, those made against a disclosed computer partner */
  againstComputer: number;
  participants: number;
  choices: number;
  overall: RateCell;
  overallRound1: RateCell;
  bySupergame: SupergameRow[];
  byRound: RoundRow[];
  lengths: LengthFit;
  points: PointsRow[];
  theory: { grimSPE: number; riskDominance: number; sizeBAD: number; tftNash: number };
}

/**
 * Cooperation, outcomes and rounds count the choices `include` admits: by default the
 * participants' own choices in paid rounds; choices filled by the timeout rule, made by a computer
 * in a participant's seat, or made in rounds after the supergame ended (block termination,
 * unpaid) are left out and counted (app/lib/choice-panel.ts). Points are the paid payoffs of
 * every row of the seat, whoever chose (what the participant is credited).
 */
export function sessionDebrief(
  rows: readonly DebriefRow[],
  design: { payoffs: StageGame; delta: number },
  include: Include = 'own',
): SessionDebrief {
  const own = rows.filter((r) => inAnalysis(r, include));
  const supergames = [...new Set(rows.map((r) => r.supergame))].sort((a, b) => a - b);
  const lengthOf = new Map<number, number>();
  for (const r of rows) lengthOf.set(r.supergame, r.supergame_length ?? Math.max(lengthOf.get(r.supergame) ?? 0, r.round));

  const bySupergame: SupergameRow[] = supergames.map((s) => {
    const mine = own.filter((r) => r.supergame === s);
    const r1 = mine.filter((r) => r.round === 1);
    let both = 0;
    let one = 0;
    let none = 0;
    for (const r of mine) {
      const c = (r.action === 'C' ? 1 : 0) + (r.partner_action === 'C' ? 1 : 0);
      if (c === 2) both++;
      else if (c === 1) one++;
      else none++;
    }
    const n = mine.length;
    return {
      supergame: s,
      length: lengthOf.get(s)!,
      all: cell(n, mine.filter((r) => r.action === 'C').length),
      round1: cell(r1.length, r1.filter((r) => r.action === 'C').length),
      outcomes: { both: n ? both / n : 0, one: n ? one / n : 0, none: n ? none / n : 0, n },
    };
  });

  const maxRound = own.reduce((m, r) => Math.max(m, r.round), 0);
  const byRound: RoundRow[] = [];
  for (let t = 1; t <= maxRound; t++) {
    const at = own.filter((r) => r.round === t);
    byRound.push({
      round: t,
      supergames: new Set(at.map((r) => r.supergame)).size,
      all: cell(at.length, at.filter((r) => r.action === 'C').length),
    });
  }

  const pointsBy = new Map<string, number>();
  for (const r of rows) pointsBy.set(r.pseudonym, (pointsBy.get(r.pseudonym) ?? 0) + (r.paid ? r.payoff : 0));
  const points = [...pointsBy].map(([subject, p]) => ({ subject, points: p })).sort((a, b) => comparePseudonyms(a.subject, b.subject));

  const round1 = own.filter((r) => r.round === 1);
  const theory = theoryAt(design.payoffs, design.delta);
  return {
    delta: design.delta,
    include,
    counts: originCounts(rows, include),
    againstComputer: own.filter((r) => r.computer_partner === 1).length,
    participants: pointsBy.size,
    choices: own.length,
    overall: cell(own.length, own.filter((r) => r.action === 'C').length),
    overallRound1: cell(round1.length, round1.filter((r) => r.action === 'C').length),
    bySupergame,
    byRound,
    lengths: lengthFit(
      supergames.map((s) => ({ supergame: s, length: lengthOf.get(s)! })),
      design.delta,
    ),
    points,
    theory: { grimSPE: theory.grimSPE, riskDominance: theory.riskDominance, sizeBAD: theory.sizeBAD, tftNash: theory.tftNash.threshold },
  };
}

/** Realised lengths (one per supergame: the draw is common to the session) against the law at δ. */
export function lengthFit(lengths: { supergame: number; length: number }[], delta: number): LengthFit {
  const n = lengths.length;
  const max = lengths.reduce((m, l) => Math.max(m, l.length), 0);
  const histogram = Array.from({ length: max }, (_, i) => {
    const k = i + 1;
    // Source: methods.md §2, P(L = k) = (1−δ)δ^(k−1).
    return { k, observed: lengths.filter((l) => l.length === k).length, expected: n * (1 - delta) * delta ** (k - 1) };
  });
  let test: LengthFit['test'];
  try {
    test = {
      ok: true,
      result: geometricLengthGof(
        lengths.map((l) => l.length),
        delta,
      ),
    };
  } catch (e) {
    test = { ok: false, message: e instanceof Error ? e.message : String(e) };
  }
  return { lengths, histogram, test };
}

/** Equal-width bins over the points distribution (at most `bins`, each at least 1 point wide). */
export function pointsHistogram(points: readonly number[], bins = 10): { from: number; to: number; count: number }[] {
  if (points.length === 0) return [];
  const lo = Math.min(...points);
  const hi = Math.max(...points);
  const width = Math.max(1, Math.ceil((hi - lo + 1) / bins));
  const count = Math.max(1, Math.ceil((hi - lo + 1) / width));
  const out = Array.from({ length: count }, (_, i) => ({ from: lo + i * width, to: lo + (i + 1) * width - 1, count: 0 }));
  for (const p of points) out[Math.min(count - 1, Math.floor((p - lo) / width))].count++;
  return out;
}

const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`;

/**
 * What a session's cooperation figures include and leave out, in words for every chart caption
 * and beside every figure: "Own choices in rounds that count: 232. Left out: 10 filled by the timeout
 * rule, …; 1 half-finished round."
 */
export function originWords(s: { debrief: Pick<SessionDebrief, 'include' | 'counts' | 'againstComputer'>; unfinished?: number }): string {
  const { counts, include, againstComputer } = s.debrief;
  const parts = [
    counts.timeout ? `${counts.timeout.toLocaleString('en-US')} filled by the timeout rule` : '',
    counts.computer_seat ? `${counts.computer_seat.toLocaleString('en-US')} made by a computer in a participant’s seat` : '',
    counts.unpaid_round ? `${counts.unpaid_round.toLocaleString('en-US')} in rounds played after the supergame had ended` : '',
  ].filter(Boolean);
  const vsComputer = againstComputer ? ` (${againstComputer.toLocaleString('en-US')} of them against a disclosed computer partner)` : '';
  const half = s.unfinished ? `${plural(s.unfinished, 'half-finished round')} (only one of the pair had chosen) left out.` : '';
  if (include === 'all') {
    const all = `All choices: ${counts.used.toLocaleString('en-US')}${vsComputer}${parts.length ? `, including ${parts.join(', ')}` : ''}.`;
    return [all, half].filter(Boolean).join(' ');
  }
  const own = `Own choices in rounds that count: ${counts.used.toLocaleString('en-US')}${vsComputer}.`;
  const left = parts.length ? `Left out: ${parts.join(', ')}.` : 'No other choices to leave out.';
  return [own, left, half].filter(Boolean).join(' ');
}
