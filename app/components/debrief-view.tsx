// The body of the staff Debrief, for one session or several side by side (treatments).
import type { EstimateStatus } from '#app/models/estimate.server';
import type { DebriefSession } from '#app/models/debrief.server';
import { sizeBAD } from '#app/lib/thresholds';
import { groupByTreatment } from '#app/lib/treatment';
import { DataTable, staffColumnHelper } from './data-table';
import { csvHref, debriefCharts } from './debrief';
import { ChartFrame, pct } from './debrief-charts';
import { EstimateProgress, EstimateResults, EstimationForm, StoredEstimates, useEstimateRun } from './estimation-panel';
import { useNavigate } from 'react-router';
import type { Include } from '#app/lib/choice-panel';
import { originWords } from '#app/lib/debrief';
import { estimateIncludedWords } from './estimation-panel';
import { ButtonLink, Notice } from './ui';

const f3 = (x: number) => String(Number(x.toFixed(3)));

export function DebriefView({
  courseId,
  sessions,
  estimates,
  current,
  basePath,
  include,
  separate = false,
}: {
  courseId: number;
  sessions: DebriefSession[];
  estimates: EstimateStatus[];
  current: EstimateStatus | null;
  /** the researcher asked to see same-named sessions of different treatments apart */
  separate?: boolean;
  /** this page's URL up to and including "?" or "&", without `include=`, for links that add parameters */
  basePath: string;
  /** the switch: own, paid choices (default) or every origin */
  include: Include;
}) {
  const ids = sessions.map((s) => s.id);
  const run = useEstimateRun(courseId, current);
  const charts = debriefCharts(courseId, sessions, undefined, include);
  const estimate = run.current;
  const withInclude = include === 'all' ? `${basePath}include=all&` : basePath;
  const projector = `/courses/${courseId}/debrief/projector?sessions=${ids.join(',')}${include === 'all' ? '&include=all' : ''}${estimate?.status === 'done' ? `&estimate=${estimate.id}` : ''}`;
  const unfinished = sessions.reduce((t, s) => t + s.unfinished, 0);
  const declined = sessions.reduce((t, s) => t + s.declined, 0);
  return (
    <div className="flex flex-col gap-8">
      {sessions.some((s) => s.simulated) ? (
        <Notice title="Simulated data">
          {sessions
            .filter((s) => s.simulated)
            .map((s) => `#${s.id}`)
            .join(', ')}
          : demo session{sessions.filter((s) => s.simulated).length > 1 ? 's' : ''} whose choices were simulated from a stated strategy
          mixture with a seeded generator; the participants are invented.
        </Notice>
      ) : null}
      {sessions.some((s) => s.status !== 'complete' && s.status !== 'archived') ? (
        <Notice tone="warn" title="Not finished">
          A session still running shows the choices so far; its numbers change as it goes on.
        </Notice>
      ) : null}
      {unfinished ? (
        <Notice title="Half-finished rounds left out">
          {unfinished === 1 ? '1 half-finished round' : `${unfinished} half-finished rounds`}: only one of the pair had chosen when the
          session was stopped or looked at. Such a round has no outcome, so it is in no figure, download or estimation.
        </Notice>
      ) : null}
      {declined ? (
        <Notice title="Declined research use">
          {declined === 1 ? '1 participant' : `${declined} participants`} declined research use of their choices. The class sees its own
          play here, theirs included; chart downloads, panel downloads and estimations leave them out.
        </Notice>
      ) : null}
      <div className="flex flex-wrap items-center gap-x-6 gap-y-2">
        <ButtonLink to={projector} variant="secondary">
          <span aria-hidden="true">▣</span> Projector mode
        </ButtonLink>
        <IncludeSwitch include={include} basePath={basePath} />
      </div>
      <TreatmentTable sessions={sessions} estimate={estimate?.status === 'done' ? estimate : null} />
      <div className="grid gap-6 xl:grid-cols-2">
        {charts.map((c) => (
          <ChartFrame key={c.id} id={c.id} title={c.title} csvHref={c.csvHref} summary={c.summary} notes={c.notes}>
            {c.render('light', false)}
          </ChartFrame>
        ))}
      </div>
      <section aria-labelledby="estimation" className="flex flex-col gap-4 rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="estimation" className="text-xl font-semibold">
          Which strategies did the class use?
        </h2>
        <p className="max-w-3xl text-slate-700">
          Strategy-frequency estimation (Dal Bó & Fréchette 2011): each participant is taken to follow one strategy of the set for the
          chosen supergames, with occasional slips; shares are estimated per treatment. Standard errors come from a bootstrap over
          participants, run on worker threads. The result is stored: the same request later opens at once.
        </p>
        <EstimationForm courseId={courseId} sessionIds={ids} separate={separate} start={run.start} include={include} />
        {estimate ? (
          <div className="flex flex-col gap-4 border-t border-slate-200 pt-4">
            <h3 className="font-semibold">
              {`Estimation #${estimate.id}: ${estimate.request.strategies.join(', ')}; B = ${estimate.request.bootstrap}, seed ${estimate.request.seed}`}
            </h3>
            <EstimateProgress estimate={estimate} />
            {estimate.status === 'done' ? (
              <EstimateResults estimate={estimate} csvHref={csvHref(courseId, 'strategies', ids, estimate.id)} />
            ) : null}
          </div>
        ) : null}
        <StoredEstimates estimates={estimates} currentId={estimate?.id ?? null} basePath={withInclude} />
      </section>
    </div>
  );
}

/**
 * The switch between own, paid choices (the default for every figure and estimation) and every
 * origin. It is a query parameter, so the chart downloads and the projector follow it.
 */
function IncludeSwitch({ include, basePath }: { include: Include; basePath: string }) {
  const navigate = useNavigate();
  return (
    <label className="inline-flex min-h-11 max-w-xl items-center gap-3">
      {/* uncontrolled, keyed by the page's state: it moves at once, the page follows the URL */}
      <input
        key={include}
        type="checkbox"
        name="include"
        className="size-5 shrink-0"
        defaultChecked={include === 'all'}
        onChange={(e) => navigate(`${basePath}${e.target.checked ? 'include=all' : ''}`.replace(/[?&]$/, ''), { preventScrollReset: true })}
      />
      <span>
        <span className="font-semibold">Include timeout-filled and computer-seat choices, and rounds after a supergame’s end</span>
        <span className="block text-sm text-slate-600">
          {include === 'all'
            ? 'On: every choice counts, whoever or whatever made it.'
            : 'Off: the participants’ own choices in the rounds that count.'}
        </span>
      </span>
    </label>
  );
}

interface TreatmentRow {
  treatment: string;
  parameters: string;
  sessions: string;
  delta: number;
  participants: number;
  choices: number;
  leftOut: number;
  cooperation: number | null;
  round1: number | null;
  sizeBAD: number;
  shares: Record<string, string>;
}

/**
 * Cooperation and (when estimated) strategy shares per treatment: sessions grouped by their frozen
 * parameters (app/lib/treatment.ts), each group with its own δ and sizeBAD. The page refused
 * same-named sessions of different treatments before this renders, unless asked to show them apart.
 */
function TreatmentTable({ sessions, estimate }: { sessions: DebriefSession[]; estimate: EstimateStatus | null }) {
  const grouping = groupByTreatment(
    sessions.map((s) => ({ id: s.id, name: s.treatment, design: s })),
    { separate: true },
  );
  const byId = new Map(sessions.map((s) => [s.id, s]));
  const strategies = estimate?.result?.strategies ?? [];
  const groups = grouping.ok ? grouping.groups : [];
  const rows: TreatmentRow[] = groups.map((group) => {
    const ss = group.sessionIds.map((id) => byId.get(id)!);
    const n = ss.reduce((t, s) => t + s.debrief.overall.n, 0);
    const c = ss.reduce((t, s) => t + s.debrief.overall.cooperate, 0);
    const n1 = ss.reduce((t, s) => t + s.debrief.overallRound1.n, 0);
    const c1 = ss.reduce((t, s) => t + s.debrief.overallRound1.cooperate, 0);
    const g = estimate?.result?.groups.find((x) => x.group === group.title);
    const shares: Record<string, string> = {};
    for (const id of strategies) {
      const k = g ? g.strategies.indexOf(id) : -1;
      shares[id] = g && k >= 0 ? `${pct(g.shares[k])}${g.se ? ` ± ${pct(g.se[k])}` : ''}` : '–';
    }
    return {
      treatment: group.names.join(' / '),
      parameters: group.label,
      sessions: ss.map((s) => `#${s.id}`).join(', '),
      delta: group.design.delta,
      participants: ss.reduce((t, s) => t + s.debrief.participants, 0),
      choices: n,
      leftOut: ss.reduce(
        (t, s) => t + s.debrief.counts.timeout + s.debrief.counts.computer_seat + s.debrief.counts.unpaid_round + s.unfinished,
        0,
      ),
      cooperation: n ? c / n : null,
      round1: n1 ? c1 / n1 : null,
      sizeBAD: sizeBAD(group.design.payoffs, group.design.delta),
      shares,
    };
  });
  const col = staffColumnHelper<TreatmentRow>();
  const columns = col.columns([
    col.accessor('treatment', { header: 'Treatment' }),
    col.accessor('parameters', { header: 'Parameters' }),
    col.accessor('sessions', { header: 'Sessions' }),
    col.accessor('delta', { header: 'δ', cell: (i) => f3(i.getValue()), meta: { align: 'right' } }),
    col.accessor('sizeBAD', { header: 'sizeBAD', cell: (i) => f3(i.getValue()), meta: { align: 'right' } }),
    col.accessor('participants', { header: 'Participants', meta: { align: 'right' } }),
    col.accessor('choices', { header: 'Choices', meta: { align: 'right' } }),
    col.accessor('leftOut', { header: 'Left out', meta: { align: 'right' } }),
    col.accessor('cooperation', { header: 'Cooperation', cell: (i) => pct(i.getValue(), 1), meta: { align: 'right' } }),
    col.accessor('round1', { header: 'Round 1', cell: (i) => pct(i.getValue(), 1), meta: { align: 'right' } }),
    ...strategies.map((id) =>
      col.accessor((r) => r.shares[id], {
        id: `share-${id}`,
        header: id,
        cell: (i) => <span className="whitespace-nowrap">{i.getValue()}</span>,
        meta: { align: 'right' },
      }),
    ),
  ]);
  return (
    <section aria-labelledby="treatments" className="flex flex-col gap-2">
      <h2 id="treatments" className="text-lg font-semibold">
        Cooperation{strategies.length ? ' and strategy shares' : ''} per treatment
      </h2>
      <DataTable columns={columns} data={rows} caption="Cooperation and strategy shares per treatment" filterLabel="Filter treatments" />
      <p className="text-sm text-slate-600">
        {strategies.length
          ? `Shares ± 1 bootstrap standard error from estimation #${estimate!.id}. `
          : 'Run an estimation below to add strategy shares. '}
        Cooperation: share of the choices counted that were cooperate. {sessions.map((s) => `#${s.id}: ${originWords(s)}`).join(' ')}
        {estimate?.result ? ` Estimation #${estimate.id}: ${estimateIncludedWords(estimate.result)}` : ''}
      </p>
    </section>
  );
}
