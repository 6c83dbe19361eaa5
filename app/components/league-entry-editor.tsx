import { type ReactNode, useId, useState } from 'react';
import { type Automaton, LIBRARY, PROFILES } from '#app/lib/automata';
import type { AutomatonIssue } from '#app/lib/automaton-check';
import { LEAGUE_MAX_STATES, leagueEntryIssues } from '#app/lib/league';
import type { StageGame } from '#app/lib/stage-game';
import { toStrategyFile } from '#app/lib/strategy-file';
import { strategyInWords } from '#app/lib/strategy-words';
import { AutomatonBuilder } from './automaton-builder';
import { StrategyPreview } from './strategy-preview';
import { cx, FieldError, TextField } from './ui';

/** The actions as the strategy table names them (a league entry is written in C and D). */
const CD = { C: 'C', D: 'D' } as const;

/** Every library strategy a league entry may start from (all fit the league's state cap). */
export const STARTING_POINTS = LIBRARY.filter((a) => a.states.length <= LEAGUE_MAX_STATES);

/** The blank start: one state that plays C whatever happened, to be changed. */
export function blankStrategy(): Automaton {
  return { id: 'mine', name: 'My strategy', states: [{ action: 'C', next: { cc: 0, cd: 0, dc: 0, dd: 0 } }] };
}

/** Whether two automata are the same state table (names and ids aside). */
export function sameStates(a: Automaton, b: Automaton) {
  return (
    a.states.length === b.states.length &&
    a.states.every((s, i) => s.action === b.states[i].action && PROFILES.every((p) => s.next[p] === b.states[i].next[p]))
  );
}

/** A deep copy of a library strategy, so edits never touch the library. */
function copyOf(a: Automaton): Automaton {
  return { id: a.id, name: a.name, states: a.states.map((s) => ({ action: s.action, next: { ...s.next } })) };
}

/** The library strategy this automaton is, state for state (its words are then the library's own), or null. */
export function libraryMatch(a: Automaton): Automaton | null {
  return LIBRARY.find((l) => sameStates(l, a)) ?? null;
}

/** The problems that belong to state i (paths `states[i]…`), and those that belong to the whole strategy. */
export function issuesByState(issues: readonly AutomatonIssue[], n: number) {
  const perState: AutomatonIssue[][] = Array.from({ length: n }, () => []);
  const whole: AutomatonIssue[] = [];
  for (const issue of issues) {
    const m = /^states\[(\d+)\]/.exec(issue.path);
    const i = m ? Number(m[1]) : -1;
    if (i >= 0 && i < n) perState[i].push(issue);
    else whole.push(issue);
  }
  return { perState, whole };
}

export interface LeagueEntryErrors {
  /** the entry's name */
  name?: string;
  /** the strategy as a whole, as the server found it (e.g. a file it could not read) */
  strategy?: string;
}

/**
 * A league entry on a phone: its name, a starting point (a library strategy, each in plain words,
 * or a blank one), the state table (each state's action, its four transitions on last round's
 * profile, which state starts), the problems beside the state they are in, and a live preview
 * against a few library strategies. Posts `name` and `strategy` (a parley-strategy v1 file as
 * JSON, docs/formats/strategy.md) with the form it sits in; the page adds the save button.
 */
export function LeagueEntryEditor({
  game,
  delta,
  defaultName = '',
  defaultStrategy,
  saved = null,
  errors = {},
  submit,
}: {
  game: StageGame;
  delta: number;
  defaultName?: string;
  /** the saved (or just posted) strategy; none: the participant picks a starting point first */
  defaultStrategy?: Automaton | null;
  /** the entry as stored, if any: the editor says when what is on screen differs from it */
  saved?: { name: string; automaton: Automaton } | null;
  errors?: LeagueEntryErrors;
  /** the save button, shown once there is a strategy to save */
  submit?: ReactNode;
}) {
  const [strategy, setStrategy] = useState<Automaton | null>(defaultStrategy ? copyOf(defaultStrategy) : null);
  const [name, setName] = useState(defaultName);
  const changed = strategy !== null && (saved === null || saved.name !== name.trim() || !sameStates(saved.automaton, strategy));
  const [startedFrom, setStartedFrom] = useState<string | null>(null);
  const pickId = useId();
  const issues = strategy ? leagueEntryIssues(strategy) : [];
  const { perState, whole } = issuesByState(issues, strategy?.states.length ?? 0);
  const start = (a: Automaton, label: string) => {
    setStrategy(a);
    setStartedFrom(label);
  };

  return (
    <div className="flex flex-col gap-6" data-testid="league-entry-editor">
      <TextField
        label="Your entry's name"
        name="name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        maxLength={60}
        autoComplete="off"
        error={errors.name}
        hint="The class sees it in the ranking and on the big screen (never your e-mail address). Your name in the course is filled in; a nickname is fine. 1–60 characters."
      />

      {errors.strategy ? (
        <div role="alert" data-testid="strategy-error">
          <FieldError>{errors.strategy}</FieldError>
        </div>
      ) : null}

      <details open={strategy === null} className="group rounded-lg border border-slate-200 bg-white">
        <summary className="flex min-h-12 cursor-pointer items-center justify-between gap-2 px-4 font-semibold">
          <span id={pickId}>{strategy ? 'Start again from…' : 'Start from…'}</span>
          <span aria-hidden="true" className="text-slate-500 group-open:rotate-180">
            ▾
          </span>
        </summary>
        <div className="flex flex-col gap-2 px-4 pb-4">
          <p className="text-sm text-slate-600">
            Each strategy is described as it would play against you. Starting from one replaces what is in the table below; you can then
            change anything.
          </p>
          <ul aria-labelledby={pickId} className="flex flex-col gap-2">
            <li>
              <button
                type="button"
                onClick={() => start(blankStrategy(), 'a blank strategy')}
                className="flex min-h-12 w-full flex-col items-start rounded-lg border border-slate-300 px-3 py-2 text-left hover:bg-slate-50"
              >
                <span className="font-semibold">Blank</span>
                <span className="text-sm text-slate-600">One state that plays C whatever happens: build your own from here.</span>
              </button>
            </li>
            {STARTING_POINTS.map((a) => (
              <li key={a.id}>
                <button
                  type="button"
                  onClick={() => start(copyOf(a), `${a.name} (${a.id})`)}
                  className="flex min-h-12 w-full flex-col items-start rounded-lg border border-slate-300 px-3 py-2 text-left hover:bg-slate-50"
                >
                  <span className="font-semibold">
                    {a.name} <span className="font-normal text-slate-500">· {a.id}</span>
                  </span>
                  <span className="text-sm text-slate-600">It {strategyInWords(a, CD)}.</span>
                </button>
              </li>
            ))}
          </ul>
        </div>
      </details>

      {strategy ? (
        <section aria-labelledby="entry-table" className="flex flex-col gap-3">
          <h2 id="entry-table" className="text-xl font-semibold">
            Your strategy
          </h2>
          {startedFrom ? (
            <p role="status" className="text-sm text-slate-700">
              Started from {startedFrom}. Change anything below.
            </p>
          ) : null}
          <p className="text-sm text-slate-600">
            Each state plays C or D. After every round the strategy moves to a next state, chosen by what was played in that round: your
            action first, then your partner&apos;s. State 1 starts. At most {LEAGUE_MAX_STATES} states.
          </p>
          {whole.length ? (
            <div role="alert" className="flex flex-col gap-1">
              {whole.map((x) => (
                <FieldError key={`${x.path}-${x.message}`}>{x.message}</FieldError>
              ))}
            </div>
          ) : null}
          <AutomatonBuilder
            value={strategy}
            onChange={(next) => setStrategy(next)}
            maxStates={LEAGUE_MAX_STATES}
            touch
            stateNote={(i) =>
              perState[i]?.length ? (
                <div className="mt-2 flex flex-col gap-1" data-testid={`state-${i + 1}-issues`}>
                  {perState[i].map((x) => (
                    <FieldError key={`${x.path}-${x.message}`}>{x.message}</FieldError>
                  ))}
                </div>
              ) : null
            }
          />
          <p
            data-testid="entry-words"
            className={cx('rounded-lg p-3 text-sm', issues.length ? 'bg-warn-50 text-slate-900' : 'bg-accent-50 text-slate-800')}
          >
            {issues.length ? (
              <>
                <span aria-hidden="true">⚠ </span>
                {issues.length === 1 ? 'One problem' : `${issues.length} problems`} to fix before this strategy can be entered.
              </>
            ) : (
              <>In words, against you it {strategyInWords(libraryMatch(strategy) ?? { ...strategy, id: 'mine' }, CD)}.</>
            )}
          </p>
          <input type="hidden" name="strategy" value={JSON.stringify(toStrategyFile({ ...strategy, id: 'mine', name: 'entry' }))} />
          <section aria-labelledby="entry-preview" className="flex flex-col gap-2 overflow-x-auto">
            <h2 id="entry-preview" className="text-xl font-semibold">
              How it plays
            </h2>
            <StrategyPreview strategy={strategy} game={game} delta={delta} rounds={8} />
          </section>
          {changed ? (
            <p role="status" data-testid="unsaved" className="font-semibold text-slate-800">
              <span aria-hidden="true">● </span>
              {saved ? 'You have changes that are not saved yet.' : 'Not entered yet: save to enter this strategy.'}
            </p>
          ) : null}
          {submit}
        </section>
      ) : (
        <p className="text-slate-600">Pick a starting point above: a blank strategy or one from the literature.</p>
      )}
    </div>
  );
}
