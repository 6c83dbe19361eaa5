// Strategy-frequency estimation from the Debrief: the request form, a progress bar that follows the
// bootstrap without leaving the page (polling the estimate's status route), and the results.
import { useEffect, useId, useState } from 'react';
import { useFetcher } from 'react-router';
import { LIBRARY } from '#app/lib/automata';
import type { Include } from '#app/lib/choice-panel';
import type { EstimateResult, EstimateStatus, GroupResult } from '#app/models/estimate.server';
import type { loader as statusLoader } from '#app/routes/debrief/estimate-status';
import type { action as startAction } from '#app/routes/debrief/estimates';
import { MAX_BOOTSTRAP, STRATEGY_ORDER, STRATEGY_PRESETS, windowWords } from '#app/utils/estimate-form';
import { DataTable, staffColumnHelper } from './data-table';
import { ChartFrame, pct, StrategiesChart } from './debrief-charts';
import { Button, cx, FieldError, Notice, SelectField, TextField } from './ui';

/** The estimate shown on the page: the stored one at first, then whatever the form started, kept fresh by polling. */
export function useEstimateRun(courseId: number, initial: EstimateStatus | null) {
  const start = useFetcher<typeof startAction>();
  const poll = useFetcher<typeof statusLoader>();
  const [current, setCurrent] = useState<EstimateStatus | null>(initial);
  // Another stored estimate from the loader replaces the shown one (React's "adjusting state when a
  // prop changes"); a revalidated copy of the same one does not overwrite fresher polled status.
  const [initialId, setInitialId] = useState(initial?.id);
  if (initial?.id !== initialId) {
    setInitialId(initial?.id);
    setCurrent(initial);
  }
  useEffect(() => {
    if (start.data?.ok) setCurrent(start.data.estimate);
  }, [start.data]);
  useEffect(() => {
    // An estimation gone from the course answers { ok: false, message }: the shown one stays.
    if (poll.data && 'id' in poll.data && poll.data.id === current?.id) setCurrent(poll.data);
  }, [poll.data, current?.id]);
  const activeId = current && (current.status === 'queued' || current.status === 'running') ? current.id : null;
  const { load, state: pollState } = poll;
  useEffect(() => {
    if (activeId === null) return;
    const t = setInterval(() => {
      if (pollState === 'idle') void load(`/courses/${courseId}/estimates/${activeId}`);
    }, 400);
    return () => clearInterval(t);
  }, [activeId, pollState, load, courseId]);
  return { current, start };
}

const STATUS = {
  queued: ['◷', 'Waiting for the estimation before it to finish'],
  running: ['⟳', 'Running'],
  done: ['✓', 'Done'],
  failed: ['✕', 'Failed'],
} as const;

export function EstimateProgress({ estimate }: { estimate: EstimateStatus }) {
  const [icon, word] = STATUS[estimate.status];
  const total = estimate.total || estimate.request.bootstrap;
  const done = estimate.status === 'done' ? total : estimate.progress;
  return (
    <div className="flex flex-col gap-2" data-testid="estimate-progress" data-status={estimate.status}>
      <p className="flex flex-wrap items-center gap-2 font-semibold" aria-live="polite">
        <span aria-hidden="true">{icon}</span>
        {word}
        {estimate.status === 'failed' && estimate.error ? <span className="font-normal">— {estimate.error}</span> : null}
      </p>
      {total > 0 ? (
        <>
          <div
            role="progressbar"
            aria-label="Bootstrap replicates done"
            aria-valuemin={0}
            aria-valuemax={total}
            aria-valuenow={done}
            className="h-4 w-full max-w-xl overflow-hidden rounded-full border border-slate-300 bg-slate-100"
          >
            <div className="h-full bg-accent-700 transition-[width] duration-300" style={{ width: `${(100 * done) / total}%` }} />
          </div>
          <p className="num text-sm text-slate-700">
            {done} of {total} bootstrap replicates ({pct(total ? done / total : 0)})
          </p>
        </>
      ) : (
        <p className="text-sm text-slate-700">No bootstrap (B = 0): point estimates only.</p>
      )}
    </div>
  );
}

export function EstimationForm({
  courseId,
  sessionIds,
  datasetId,
  separate = false,
  start,
  defaults,
  include = 'own',
}: {
  courseId: number;
  /** sessions that share a name but ran different treatments are estimated apart (asked for on the page) */
  separate?: boolean;
  /** the sessions to estimate on, or (instead) an uploaded dataset */
  sessionIds?: number[];
  datasetId?: number;
  start: ReturnType<typeof useEstimateRun>['start'];
  defaults?: { bootstrap?: number; seed?: number };
  /** sessions only: the choices the page's switch admits, stored in the request */
  include?: Include;
}) {
  const [windowKind, setWindowKind] = useState('all');
  const [preset, setPreset] = useState('dbf2011');
  // Refused: the fields' errors (bad form), or why it cannot start (course limit, mixed treatments…).
  const refused = start.data && !start.data.ok ? start.data : null;
  const errors = refused && 'errors' in refused ? refused.errors : {};
  const message = refused && 'message' in refused ? refused.message : undefined;
  const groupId = useId();
  return (
    <start.Form
      method="post"
      action={`/courses/${courseId}/estimates`}
      className="flex flex-col gap-4"
      aria-label="Estimate strategy shares"
    >
      {datasetId !== undefined ? (
        <input type="hidden" name="dataset" value={datasetId} />
      ) : (
        <>
          <input type="hidden" name="sessions" value={(sessionIds ?? []).join(',')} />
          <input type="hidden" name="include" value={include} />
          <p className="text-sm text-slate-700" data-testid="estimate-include">
            {include === 'all'
              ? 'Uses every choice, including those filled by the timeout rule, made by a computer in a participant’s seat, or made after a supergame had ended (the switch above).'
              : 'Uses the participants’ own choices in the rounds that count: each supergame up to its first choice that is not (the switch above includes the others).'}{' '}
            Participants who declined research use are left out.
          </p>
        </>
      )}
      {separate ? <input type="hidden" name="treatments" value="separate" /> : null}
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <SelectField
          label="Supergames to use"
          name="windowKind"
          value={windowKind}
          onChange={(e) => setWindowKind(e.target.value)}
          error={errors.windowKind}
          options={[
            { value: 'all', label: 'All supergames' },
            { value: 'supergames', label: 'A range of supergames' },
            { value: 'last', label: 'The last n supergames' },
            { value: 'after-rounds', label: 'Supergames starting after r rounds' },
          ]}
        />
        {windowKind === 'supergames' ? (
          <>
            <TextField label="From supergame" name="from" inputMode="numeric" defaultValue="1" error={errors.from} />
            <TextField label="To supergame" name="to" inputMode="numeric" defaultValue="10" error={errors.to} />
          </>
        ) : null}
        {windowKind === 'last' ? (
          <TextField label="Last n supergames" name="last" inputMode="numeric" defaultValue="5" error={errors.last} />
        ) : null}
        {windowKind === 'after-rounds' ? (
          <TextField
            label="Start after r rounds"
            name="afterRounds"
            inputMode="numeric"
            defaultValue="20"
            error={errors.afterRounds}
            hint="Dal Bó & Fréchette (2011) use 110 rounds."
          />
        ) : null}
      </div>
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <SelectField
          label="Strategy set"
          name="preset"
          value={preset}
          onChange={(e) => setPreset(e.target.value)}
          error={errors.preset}
          options={[
            { value: 'dbf2011', label: 'Dal Bó & Fréchette (2011) six' },
            { value: 'custom', label: 'Choose from the library' },
          ]}
        />
        <TextField
          label="Bootstrap replicates (B)"
          name="bootstrap"
          inputMode="numeric"
          defaultValue={String(defaults?.bootstrap ?? 200)}
          error={errors.bootstrap}
          hint={`0 for none; at most ${MAX_BOOTSTRAP}.`}
        />
        <TextField
          label="Seed"
          name="seed"
          inputMode="numeric"
          defaultValue={String(defaults?.seed ?? 1)}
          error={errors.seed}
          hint="The same seed gives the same standard errors."
        />
      </div>
      {preset === 'custom' ? (
        <fieldset aria-describedby={errors.strategy ? `${groupId}-err` : undefined} className="flex flex-col gap-2">
          <legend className="font-semibold text-slate-800">Strategies</legend>
          <div className="flex flex-wrap gap-x-5 gap-y-2">
            {STRATEGY_ORDER.map((id) => (
              <label key={id} className="inline-flex min-h-11 items-center gap-2">
                <input
                  type="checkbox"
                  name="strategy"
                  value={id}
                  defaultChecked={(STRATEGY_PRESETS.dbf2011.ids as readonly string[]).includes(id)}
                  className="size-5"
                />
                <span>
                  <strong>{id}</strong> <span className="text-sm text-slate-600">{LIBRARY.find((a) => a.id === id)?.name}</span>
                </span>
              </label>
            ))}
          </div>
          {errors.strategy ? <FieldError id={`${groupId}-err`}>{errors.strategy}</FieldError> : null}
        </fieldset>
      ) : (
        <p className="text-sm text-slate-600">{STRATEGY_PRESETS.dbf2011.label}.</p>
      )}
      {errors.form || message ? <Notice tone="error">{errors.form ?? message}</Notice> : null}
      <div>
        <Button type="submit" disabled={start.state !== 'idle'}>
          {start.state !== 'idle' ? 'Starting…' : 'Run estimation'}
        </Button>
      </div>
    </start.Form>
  );
}

interface ShareRow {
  group: string;
  strategy: string;
  share: number;
  se: number | null;
  assigned: number;
  expected: number;
}

const col = staffColumnHelper<ShareRow>();
const shareColumns = col.columns([
  col.accessor('group', { header: 'Treatment' }),
  col.accessor('strategy', { header: 'Strategy' }),
  col.accessor('share', { header: 'Share', cell: (i) => pct(i.getValue(), 1), meta: { align: 'right' } }),
  col.accessor('se', {
    header: 'Bootstrap SE',
    cell: (i) => (i.getValue() === null ? '–' : pct(i.getValue(), 1)),
    meta: { align: 'right' },
  }),
  col.accessor('assigned', { header: 'Participants assigned', cell: (i) => `${i.getValue()}`, meta: { align: 'right' } }),
  col.accessor('expected', { header: 'Expected participants', cell: (i) => i.getValue().toFixed(1), meta: { align: 'right' } }),
]);

export function EstimateResults({ estimate, csvHref }: { estimate: EstimateStatus; csvHref: string }) {
  const result = estimate.result;
  if (!result) return null;
  const rows: ShareRow[] = result.groups.flatMap((g: GroupResult) =>
    g.strategies.map((s, k) => ({
      group: g.group,
      strategy: s,
      share: g.shares[k],
      se: g.se ? g.se[k] : null,
      assigned: g.assigned[k],
      expected: g.expected[k],
    })),
  );
  return (
    <div className="flex flex-col gap-4" data-testid="estimate-results">
      <ChartFrame
        id="strategies"
        title="Estimated strategy shares"
        csvHref={csvHref}
        summary={result.groups.map((g) => `${g.group}: ${g.strategies.map((s, k) => `${s} ${pct(g.shares[k])}`).join(', ')}`).join('. ')}
        notes={`Per treatment; ${result.bootstrap > 0 ? `bars: ± 1 bootstrap standard error over participants (B = ${result.bootstrap}, seed ${result.seed})` : 'no bootstrap'}. Window: ${windowWords(result.window)}. ${estimateIncludedWords(result)}`}
      >
        <StrategiesChart groups={result.groups} />
      </ChartFrame>
      <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        {result.groups.map((g) => (
          <div key={g.group} className="rounded-lg border border-slate-200 bg-white p-3 text-sm">
            <dt className="font-semibold">{g.group}</dt>
            <dd className="num">
              {g.subjects} participants, {g.choices} choices
              <br />β = {g.beta.toFixed(3)}
              {g.seBeta !== null ? ` (SE ${g.seBeta.toFixed(3)})` : ''} — chance a choice follows the strategy
              <br />γ = {Number.isFinite(g.gamma) ? g.gamma.toFixed(3) : '∞'}, ln L = {g.logLik.toFixed(2)}
              {g.converged ? '' : ' (EM did not converge)'}
            </dd>
          </div>
        ))}
      </dl>
      {result.warnings.length ? <Notice tone="warn">{result.warnings.slice(0, 3).join(' ')}</Notice> : null}
      <DataTable
        columns={shareColumns}
        data={rows}
        caption="Estimated strategy shares and posterior assignments"
        filterLabel="Filter strategies"
      />
      <p className="text-sm text-slate-600">
        “Participants assigned”: how many participants’ highest posterior probability is on the strategy; “expected”: the sum of their
        posterior probabilities. With no defections, Grim, TFT, WSLS, T2 and ALLC prescribe the same choices: read their shares together.
      </p>
    </div>
  );
}

/** What an estimation used and left out, in words (captions and the stored list). */
export function estimateIncludedWords(result: Pick<EstimateResult, 'include' | 'leftOut'>): string {
  const l = result.leftOut;
  if (!l) return '';
  const n = (x: number) => x.toLocaleString('en-US');
  const parts = [
    l.timeout ? `${n(l.timeout)} filled by the timeout rule` : '',
    l.computer_seat ? `${n(l.computer_seat)} made by a computer in a participant’s seat` : '',
    l.unpaid_round ? `${n(l.unpaid_round)} in rounds after the supergame had ended` : '',
    l.afterLeftOut ? `${n(l.afterLeftOut)} own choices after one of those in the same supergame` : '',
    l.unfinished ? `${n(l.unfinished)} in half-finished rounds` : '',
  ].filter(Boolean);
  const used =
    result.include === 'all' ? `Choices used: ${n(l.used)}, every origin.` : `Choices used: ${n(l.used)} own choices in rounds that count.`;
  const left = parts.length ? ` Left out: ${parts.join(', ')}.` : '';
  const declined = l.declined ? ` ${n(l.declined)} participant${l.declined === 1 ? '' : 's'} who declined research use left out.` : '';
  return used + left + declined;
}

function includeWords(r: EstimateStatus['request']): string {
  if (r.source.kind !== 'sessions') return '';
  if (r.include === 'all') return 'every origin; ';
  if (r.include === 'own') return 'own choices in rounds that count; ';
  return 'own and timeout-filled choices (run before origins were kept); ';
}

export function StoredEstimates({
  estimates,
  currentId,
  basePath,
}: {
  estimates: EstimateStatus[];
  currentId: number | null;
  basePath: string;
}) {
  if (estimates.length < 2) return null;
  return (
    <details className="text-sm">
      <summary className="min-h-11 cursor-pointer py-2 font-semibold text-accent-700">
        Earlier estimations on these sessions ({estimates.length})
      </summary>
      <ul className="flex flex-col gap-1">
        {estimates.map((e) => (
          <li key={e.id}>
            <a
              href={`${basePath}estimate=${e.id}`}
              className={cx('underline-offset-4 hover:underline', e.id === currentId ? 'font-semibold' : 'text-accent-700')}
            >
              #{e.id}: {windowWords(e.request.window)}; {includeWords(e.request)}
              {e.request.strategies.join(', ')}; B = {e.request.bootstrap}, seed {e.request.seed} — {STATUS[e.status][1].toLowerCase()}
            </a>
          </li>
        ))}
      </ul>
    </details>
  );
}
