// The Debrief's charts as a list, so the page shows them all and the projector one at a time.
import type { ReactNode } from 'react';
import type { ChartId, TableSession } from '#app/lib/debrief-tables';
import { CHARTS } from '#app/lib/debrief-tables';
import type { Include } from '#app/lib/choice-panel';
import { originWords } from '#app/lib/debrief';
import { basinAt, type Basin } from '#app/lib/thresholds';
import {
  CoopByRoundChart,
  CoopBySupergameChart,
  LengthsChart,
  OutcomesChart,
  payoffSets,
  PointsChart,
  pct,
  StrategiesChart,
  TheoryChart,
  type StrategyGroup,
  type Theme,
} from './debrief-charts';

export interface DebriefChart {
  id: ChartId;
  title: string;
  csvHref: string;
  summary: string;
  notes?: ReactNode;
  render: (theme: Theme, big: boolean) => ReactNode;
}

const f3 = (x: number) => String(Number(x.toFixed(3)));
/** The same comparison as the design editor's theory panel, so a tie reads as a tie in both. */
const RISK_WORDS: Record<Basin, string> = {
  cooperation: 'grim risk-dominates always-defect',
  tie: 'a tie: neither risk-dominates the other',
  defection: 'always-defect risk-dominates',
};

/** A chart's CSV: the same sessions and the same choices (`include`) as the page shows. */
export function csvHref(courseId: number, chart: ChartId, sessionIds: number[], estimateId?: number, include: Include = 'own') {
  return chart === 'strategies' && estimateId
    ? `/courses/${courseId}/debrief/csv/strategies?estimate=${estimateId}`
    : `/courses/${courseId}/debrief/csv/${chart}?sessions=${sessionIds.join(',')}${include === 'all' ? '&include=all' : ''}`;
}

/** Words for the test of one session's lengths against the geometric law. */
export function lengthTestWords(s: TableSession): string {
  const t = s.debrief.lengths.test;
  if (!t.ok) return `#${s.id}: no test — ${t.message}.`;
  const r = t.result;
  const bins = r.bins.map((b) => (b.to === null ? `${b.from}+` : String(b.from))).join(', ');
  const p =
    r.method === 'simulated'
      ? `simulated p = ${r.pValue.toFixed(3)} from ${r.replicates?.toLocaleString('en-US')} seeded samples (too few supergames for the χ² distribution)`
      : `df = ${r.df}, p = ${r.pValue.toFixed(3)}`;
  return `#${s.id}: χ² = ${r.statistic.toFixed(3)}, ${p} (${r.n} supergames; bins ${bins}; δ = ${f3(r.delta)} known).`;
}

/** Which curve each session is read against: one per payoff set. */
function theoryCurveWords(sessions: TableSession[]): string {
  const sets = payoffSets(sessions);
  if (sets.length === 1) return 'Curve: sizeBAD';
  return `Curves: sizeBAD for each payoff set, each session read against its own (${sets.map((set) => `${set.label}: ${set.sessions}`).join('; ')})`;
}

export function debriefCharts(
  courseId: number,
  sessions: TableSession[],
  estimate?: { id: number; groups: StrategyGroup[]; B: number; seed: number; window: string; included?: string },
  include: Include = 'own',
): DebriefChart[] {
  const ids = sessions.map((s) => s.id);
  const each = (fn: (s: TableSession) => string) => sessions.map(fn).join(' ');
  const csv = (chart: ChartId) => csvHref(courseId, chart, ids, undefined, include);
  // what every cooperation figure counts, per session
  const included = sessions.length === 1 ? originWords(sessions[0]) : each((s) => `#${s.id}: ${originWords(s)}`);
  const charts: DebriefChart[] = [
    {
      id: 'cooperation-by-supergame',
      title: CHARTS['cooperation-by-supergame'],
      csvHref: csv('cooperation-by-supergame'),
      summary: each((s) => {
        const g = s.debrief.bySupergame;
        return `Session ${s.id}: cooperation ${pct(g[0]?.all.rate)} in supergame 1 and ${pct(g[g.length - 1]?.all.rate)} in supergame ${g.length}; overall ${pct(s.debrief.overall.rate)}, round 1 ${pct(s.debrief.overallRound1.rate)}.`;
      }),
      notes: `Solid: all rounds; dashed: round 1 only. Share of choices that were cooperate. ${included}`,
      render: (theme, big) => <CoopBySupergameChart sessions={sessions} theme={theme} big={big} />,
    },
    {
      id: 'cooperation-by-round',
      title: CHARTS['cooperation-by-round'],
      csvHref: csv('cooperation-by-round'),
      summary: each(
        (s) => `Session ${s.id}: round 1 ${pct(s.debrief.byRound[0]?.all.rate)}, round 2 ${pct(s.debrief.byRound[1]?.all.rate)}.`,
      ),
      notes: `Pooled over the supergames that reached each round; late rounds rest on few supergames (see the CSV for counts). ${included}`,
      render: (theme, big) => <CoopByRoundChart sessions={sessions} theme={theme} big={big} />,
    },
    {
      id: 'outcomes',
      title: CHARTS.outcomes,
      csvHref: csv('outcomes'),
      summary: each((s) => {
        const n = s.debrief.bySupergame.reduce((t, g) => t + g.outcomes.n, 0);
        const share = (k: 'both' | 'one' | 'none') =>
          n ? s.debrief.bySupergame.reduce((t, g) => t + g.outcomes[k] * g.outcomes.n, 0) / n : 0;
        return `Session ${s.id}: both cooperate ${pct(share('both'))}, one ${pct(share('one'))}, neither ${pct(share('none'))}.`;
      }),
      notes: `${sessions.length === 1 ? 'Share of participant-rounds by what the pair chose, per supergame.' : 'Share of participant-rounds by what the pair chose, over the whole session.'} ${included}`,
      render: (theme, big) => <OutcomesChart sessions={sessions} theme={theme} big={big} />,
    },
    {
      id: 'lengths',
      title: CHARTS.lengths,
      csvHref: csv('lengths'),
      summary: each(lengthTestWords),
      notes: (
        <>
          Bars: share of supergames that lasted L rounds (one draw sequence per session, common to all pairs; the lengths come from the
          draws, whoever chose). Lines: the geometric law P(L = k) = (1−δ)δ^(k−1) of random termination. Pearson’s χ² goodness-of-fit test
          with tail bins pooled to expected counts ≥ 5, δ known. {each(lengthTestWords)}
        </>
      ),
      render: (theme, big) => <LengthsChart sessions={sessions} theme={theme} big={big} />,
    },
    {
      id: 'points',
      title: CHARTS.points,
      csvHref: csv('points'),
      summary: each((s) => {
        const pts = s.debrief.points.map((p) => p.points).sort((a, b) => a - b);
        return `Session ${s.id}: ${pts.length} participants, points from ${pts[0] ?? 0} to ${pts[pts.length - 1] ?? 0}, median ${pts[Math.floor(pts.length / 2)] ?? 0}.`;
      }),
      notes:
        'Points of each participant over the session: the payoffs of every round that counts, whoever chose (what each participant is credited; pseudonyms in the CSV).',
      render: (theme, big) => <PointsChart sessions={sessions} theme={theme} big={big} />,
    },
    {
      id: 'theory',
      title: CHARTS.theory,
      csvHref: csv('theory'),
      summary: each(
        (s) =>
          `Session ${s.id} at δ = ${f3(s.delta)}: δ_SPE ${f3(s.debrief.theory.grimSPE)} (${s.delta >= s.debrief.theory.grimSPE ? 'cooperation can be an equilibrium' : 'cooperation is not an equilibrium'}), δ_RD ${f3(s.debrief.theory.riskDominance)} (${RISK_WORDS[basinAt(s.payoffs, s.delta)]}), sizeBAD ${f3(s.debrief.theory.sizeBAD)}; cooperation ${pct(s.debrief.overall.rate)}, round 1 ${pct(s.debrief.overallRound1.rate)}.`,
      ),
      notes: `Markers: each session’s cooperation (all rounds and round 1) at its δ. ${theoryCurveWords(sessions)}, the size of the basin of attraction of always-defect against grim (1 below δ_SPE, under ½ beyond δ_RD). δ_SPE = (T−R)/(T−P) (grim is subgame perfect), δ_RD = (T−R+P−S)/(T−S) (grim risk-dominates always-defect); Dal Bó & Fréchette (2011, 2018), Blonski, Ockenfels & Spagnolo (2011). ${included}`,
      render: (theme, big) => <TheoryChart sessions={sessions} theme={theme} big={big} />,
    },
  ];
  if (estimate && estimate.groups.length > 0) {
    charts.push({
      id: 'strategies',
      title: CHARTS.strategies,
      csvHref: csvHref(courseId, 'strategies', ids, estimate.id),
      summary: estimate.groups
        .map(
          (g) =>
            `${g.group}: ${g.strategies.map((id, k) => `${id} ${pct(g.shares[k])}${g.se ? ` (SE ${pct(g.se[k], 1)})` : ''}`).join(', ')}.`,
        )
        .join(' '),
      notes: `Strategy-frequency estimation (Dal Bó & Fréchette 2011) per treatment; ${estimate.B > 0 ? `bars: ± 1 bootstrap standard error over participants (B = ${estimate.B}, seed ${estimate.seed})` : 'no bootstrap'}; window: ${estimate.window}.${estimate.included ? ` ${estimate.included}` : ''}`,
      render: (theme, big) => <StrategiesChart groups={estimate.groups} theme={theme} big={big} />,
    });
  }
  return charts;
}
