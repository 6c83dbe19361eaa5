import { useMemo, useState } from 'react';
import { useFetcher } from 'react-router';
import { type Automaton, LIBRARY } from '#app/lib/automata';
import { MAX_STATES, validateAutomaton } from '#app/lib/automaton-check';
import { breakingDeviation, checkStrategy, formatIntervals, inIntervals } from '#app/lib/equilibrium';
import type { StageGame } from '#app/lib/stage-game';
import { expectedTotal } from '#app/lib/values';
import { AutomatonBuilder } from './automaton-builder';
import { Button, FieldError, Notice } from './ui';

const fmt = (x: number, d = 3) => String(Number(x.toFixed(d)));
const NEW = '__new__';

function blank(): Automaton {
  return { id: 'MINE', name: 'My strategy', states: [{ action: 'C', next: { cc: 0, cd: 0, dc: 0, dd: 0 } }] };
}

/**
 * Pick a strategy or build one as a state table, and see for which δ the symmetric profile is a
 * Nash equilibrium and for which it is subgame perfect, its values against the library at the
 * design's payoffs and δ, and the deviation that breaks it.
 */
export function StrategyChecker({
  game,
  delta,
  courseStrategies,
  saveAction,
  canSave,
}: {
  game: StageGame | null;
  delta: number | null;
  courseStrategies: Automaton[];
  saveAction: string;
  canSave: boolean;
}) {
  const all = useMemo(() => [...LIBRARY, ...courseStrategies], [courseStrategies]);
  const [selected, setSelected] = useState<string>('TFT');
  const [draft, setDraft] = useState<Automaton>(blank);
  const fetcher = useFetcher<{ ok: boolean; errors?: Record<string, string>; message?: string }>();
  const strategy = selected === NEW ? draft : (all.find((a) => a.id === selected) ?? LIBRARY[0]);
  const issues = selected === NEW ? validateAutomaton(draft) : [];

  const result = useMemo(() => {
    if (!game || issues.length) return null;
    const intervals = checkStrategy(strategy, game);
    const atDelta = delta
      ? {
          nash: inIntervals(intervals.nash, delta),
          spe: inIntervals(intervals.spe, delta),
          deviation: breakingDeviation(strategy, game, delta),
          values: all.map((b) => ({ id: b.id, v: expectedTotal(strategy, b, game, delta) })),
        }
      : null;
    return { intervals, atDelta };
  }, [game, delta, strategy, issues.length, all]);

  return (
    <section aria-labelledby="checker-title" className="flex flex-col gap-4 rounded-lg border border-slate-200 bg-white p-4">
      <h2 id="checker-title" className="text-lg font-semibold">
        Strategy checker
      </h2>
      <div className="flex flex-col gap-1">
        <label htmlFor="checker-strategy" className="font-semibold">
          Strategy
        </label>
        <select
          id="checker-strategy"
          value={selected}
          onChange={(e) => setSelected(e.target.value)}
          className="min-h-11 rounded-lg border border-slate-300 bg-white px-3"
        >
          <optgroup label="Library">
            {LIBRARY.map((a) => (
              <option key={a.id} value={a.id}>
                {a.id} — {a.name}
              </option>
            ))}
          </optgroup>
          {courseStrategies.length ? (
            <optgroup label="This course">
              {courseStrategies.map((a) => (
                <option key={a.id} value={a.id}>
                  {a.id} — {a.name}
                </option>
              ))}
            </optgroup>
          ) : null}
          <option value={NEW}>Build your own…</option>
        </select>
      </div>

      {selected === NEW ? (
        <fetcher.Form method="post" action={saveAction} className="flex flex-col gap-3">
          <input type="hidden" name="automaton" value={JSON.stringify(draft)} />
          <div className="flex flex-wrap gap-3">
            <label className="flex flex-col gap-1">
              <span className="font-semibold">Short name</span>
              <input
                value={draft.id}
                onChange={(e) => setDraft({ ...draft, id: e.target.value })}
                maxLength={24}
                className="min-h-11 w-36 rounded-lg border border-slate-300 px-3"
                aria-describedby={fetcher.data?.errors?.id ? 'checker-id-error' : undefined}
              />
            </label>
            <label className="flex flex-1 flex-col gap-1">
              <span className="font-semibold">Description</span>
              <input
                value={draft.name}
                onChange={(e) => setDraft({ ...draft, name: e.target.value })}
                maxLength={120}
                className="min-h-11 rounded-lg border border-slate-300 px-3"
              />
            </label>
          </div>
          {fetcher.data?.errors?.id ? <FieldError id="checker-id-error">{fetcher.data.errors.id}</FieldError> : null}
          <AutomatonBuilder
            value={draft}
            onChange={setDraft}
            maxStates={MAX_STATES}
            actions={
              canSave ? (
                <Button type="submit" disabled={issues.length > 0 || fetcher.state !== 'idle'}>
                  Save to this course
                </Button>
              ) : null
            }
          />
          {issues.length ? (
            <ul className="flex flex-col gap-1" aria-live="polite">
              {issues.map((i) => (
                <li key={i.path + i.message}>
                  <FieldError>{i.message}</FieldError>
                </li>
              ))}
            </ul>
          ) : null}
          {fetcher.data?.ok ? <Notice tone="ok">{fetcher.data.message}</Notice> : null}
        </fetcher.Form>
      ) : null}

      {!game ? <p className="text-slate-600">Enter valid payoffs to check strategies.</p> : null}
      {result ? (
        <div className="flex flex-col gap-3" aria-live="polite" data-testid="checker-result">
          <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt className="font-semibold">Nash equilibrium for δ in</dt>
            <dd className="num" data-testid="nash-intervals">
              {formatIntervals(result.intervals.nash, 4) || 'no δ'}
            </dd>
            <dt className="font-semibold">Subgame perfect for δ in</dt>
            <dd className="num" data-testid="spe-intervals">
              {formatIntervals(result.intervals.spe, 4) || 'no δ'}
            </dd>
          </dl>
          {result.atDelta ? (
            <>
              <p className="text-sm">
                At δ = {fmt(delta!, 4)}:{' '}
                {result.atDelta.spe
                  ? 'subgame perfect'
                  : result.atDelta.nash
                    ? 'a Nash equilibrium, not subgame perfect'
                    : 'not a Nash equilibrium'}
                . <span className="text-slate-700">{result.atDelta.deviation.text}.</span>
              </p>
              <details>
                <summary className="cursor-pointer font-semibold text-accent-700">Expected points against each strategy at this δ</summary>
                <table className="mt-2 text-sm">
                  <caption className="sr-only">Expected total points V of {strategy.id} against each strategy</caption>
                  <thead>
                    <tr className="text-left text-slate-600">
                      <th scope="col" className="pr-4">
                        Partner
                      </th>
                      <th scope="col" className="text-right">
                        V ({strategy.id})
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {result.atDelta.values.map((r) => (
                      <tr key={r.id}>
                        <th scope="row" className="pr-4 text-left font-normal">
                          {r.id}
                        </th>
                        <td className="num text-right">{fmt(r.v)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </details>
            </>
          ) : null}
        </div>
      ) : null}
    </section>
  );
}
