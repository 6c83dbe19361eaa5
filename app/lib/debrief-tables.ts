/**
 * The data behind each Debrief chart as flat rows, for its "download data (CSV)" link and for the
 * chart itself (so the file holds exactly what is drawn). Pure.
 */
import type { CsvColumn } from './csv';
import type { SessionDebrief } from './debrief';
import { pointsHistogram } from './debrief';
import type { StageGame } from './stage-game';
import { grimSPE, riskDominance, sizeBAD } from './thresholds';

export const CHARTS = {
  'cooperation-by-supergame': 'Cooperation by supergame',
  'cooperation-by-round': 'Cooperation by round within the supergame',
  outcomes: 'Outcomes: both cooperate, one, none',
  lengths: 'Realised supergame lengths against the geometric law',
  points: 'Points per participant',
  theory: 'Cooperation against δ and the theory’s thresholds',
  strategies: 'Estimated strategy shares',
} as const;
export type ChartId = keyof typeof CHARTS;
export const CHART_IDS = Object.keys(CHARTS) as ChartId[];

export interface TableSession {
  id: number;
  treatment: string;
  delta: number;
  payoffs: StageGame;
  debrief: SessionDebrief;
  /** rounds only one seat of a pair chose in (left out of every figure) */
  unfinished?: number;
}

export type Cell = string | number | null;
export type Table = Record<string, Cell>[];

/** The tables' text columns (labels people chose, or words); every other column is a number. */
const TEXT_COLUMNS = new Set(['treatment', 'sessions', 'pseudonym', 'strategy', 'window', 'include']);

/** A table's columns for the CSV writer (app/lib/csv.ts), in the order of its first row. */
export function tableColumns(rows: Table): CsvColumn[] {
  return Object.keys(rows[0] ?? {}).map((key) => ({ key, type: TEXT_COLUMNS.has(key) ? 'text' : 'number' }));
}

const r4 = (x: number | null) => (x === null ? null : Math.round(x * 1e4) / 1e4);

/** Rows of one chart over the chosen sessions (long format: one row per session and x value). */
export function chartTable(chart: Exclude<ChartId, 'strategies'>, sessions: readonly TableSession[]): Table {
  const rows: Table = [];
  switch (chart) {
    case 'cooperation-by-supergame':
      for (const s of sessions)
        for (const g of s.debrief.bySupergame)
          rows.push({
            session: s.id,
            treatment: s.treatment,
            supergame: g.supergame,
            length: g.length,
            choices: g.all.n,
            cooperation: r4(g.all.rate),
            round1_choices: g.round1.n,
            round1_cooperation: r4(g.round1.rate),
            include: s.debrief.include,
          });
      return rows;
    case 'cooperation-by-round':
      for (const s of sessions)
        for (const r of s.debrief.byRound)
          rows.push({
            session: s.id,
            treatment: s.treatment,
            round: r.round,
            supergames: r.supergames,
            choices: r.all.n,
            cooperation: r4(r.all.rate),
            include: s.debrief.include,
          });
      return rows;
    case 'outcomes':
      for (const s of sessions)
        for (const g of s.debrief.bySupergame)
          rows.push({
            session: s.id,
            treatment: s.treatment,
            supergame: g.supergame,
            choices: g.outcomes.n,
            both_cooperate: r4(g.outcomes.both),
            one_cooperates: r4(g.outcomes.one),
            none_cooperates: r4(g.outcomes.none),
            include: s.debrief.include,
          });
      return rows;
    case 'lengths':
      for (const s of sessions) {
        const n = s.debrief.lengths.lengths.length;
        for (const h of s.debrief.lengths.histogram)
          rows.push({
            session: s.id,
            treatment: s.treatment,
            delta: s.delta,
            length: h.k,
            observed: h.observed,
            expected: r4(h.expected),
            observed_share: r4(h.observed / n),
            geometric_probability: r4(h.expected / n),
          });
      }
      return rows;
    case 'points': {
      for (const s of sessions)
        for (const p of s.debrief.points) rows.push({ session: s.id, treatment: s.treatment, pseudonym: p.subject, points: p.points });
      return rows;
    }
    case 'theory':
      for (const s of sessions)
        rows.push({
          session: s.id,
          treatment: s.treatment,
          delta: s.delta,
          R: s.payoffs.R,
          S: s.payoffs.S,
          T: s.payoffs.T,
          P: s.payoffs.P,
          delta_spe: r4(grimSPE(s.payoffs)),
          delta_rd: r4(riskDominance(s.payoffs)),
          size_bad: r4(sizeBAD(s.payoffs, s.delta)),
          cooperation: r4(s.debrief.overall.rate),
          round1_cooperation: r4(s.debrief.overallRound1.rate),
          include: s.debrief.include,
          choices: s.debrief.counts.used,
          left_out_timeout: s.debrief.counts.timeout,
          left_out_computer_seat: s.debrief.counts.computer_seat,
          left_out_unpaid_round: s.debrief.counts.unpaid_round,
          half_finished_rounds: s.unfinished ?? 0,
        });
      return rows;
  }
}

/** Points histogram bins shared by all sessions (so overlaid bars line up). */
export function pointsBins(sessions: readonly TableSession[], bins = 10) {
  const all = sessions.flatMap((s) => s.debrief.points.map((p) => p.points));
  const edges = pointsHistogram(all, bins);
  const out = edges.map((b) => {
    const row: Record<string, number | string> = { bin: `${b.from}–${b.to}`, from: b.from, to: b.to };
    for (const s of sessions) row[`s${s.id}`] = 0;
    return row;
  });
  if (edges.length === 0) return out;
  // the same bin rule as pointsHistogram: ⌊(p − lowest) / width⌋, the top bin takes the rest
  const lo = edges[0].from;
  const width = edges[0].to - edges[0].from + 1;
  for (const s of sessions)
    for (const p of s.debrief.points) {
      const row = out[Math.min(out.length - 1, Math.floor((p.points - lo) / width))];
      row[`s${s.id}`] = (row[`s${s.id}`] as number) + 1;
    }
  return out;
}

/** sizeBAD and the thresholds on a δ grid, for the theory chart's curve. */
export function sizeBadCurve(payoffs: StageGame, steps = 99) {
  return Array.from({ length: steps }, (_, i) => {
    const delta = (i + 1) / (steps + 1);
    return { delta, sizeBAD: sizeBAD(payoffs, delta) };
  });
}
