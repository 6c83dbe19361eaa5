import type { ReactNode } from 'react';
import { type Action, type Automaton, PROFILES, type Profile } from '#app/lib/automata';
import { Button } from './ui';

export const PROFILE_WORDS: Record<Profile, string> = {
  cc: 'after (C, C)',
  cd: 'after (C, D)',
  dc: 'after (D, C)',
  dd: 'after (D, D)',
};

type State = Automaton['states'][number];

/** The states without state `i`; transitions into it go to the start, later indices move down. */
export function withoutState(a: Automaton, i: number): Automaton {
  return {
    ...a,
    states: a.states
      .filter((_, j) => j !== i)
      .map((st) => ({
        ...st,
        next: Object.fromEntries(PROFILES.map((p) => [p, st.next[p] === i ? 0 : st.next[p] > i ? st.next[p] - 1 : st.next[p]])) as Record<
          Profile,
          number
        >,
      })),
  };
}

/** A new last state that plays D and stays put. */
export function withNewState(a: Automaton): Automaton {
  const k = a.states.length;
  return { ...a, states: [...a.states, { action: 'D', next: { cc: k, cd: k, dc: k, dd: k } }] };
}

/**
 * State `i` becomes the start (state 1): it swaps places with the old start and every transition
 * follows the swap, so the strategy plays exactly as before from its new first state.
 */
export function withStart(a: Automaton, i: number): Automaton {
  if (i === 0) return a;
  const swap = (k: number) => (k === i ? 0 : k === 0 ? i : k);
  const order = a.states.map((_, k) => swap(k));
  return {
    ...a,
    states: order.map((k) => {
      const st = a.states[k];
      return { ...st, next: Object.fromEntries(PROFILES.map((p) => [p, swap(st.next[p])])) as Record<Profile, number> };
    }),
  };
}

/**
 * A strategy as a state table: one card per state (its action, its four transitions two by two),
 * so it fits a side panel (30rem) and a phone without a sideways scroll. Controlled: the caller
 * keeps the automaton and checks it.
 */
export function AutomatonBuilder({
  value,
  onChange,
  maxStates,
  actions,
  touch = false,
  stateNote,
}: {
  value: Automaton;
  onChange: (next: Automaton) => void;
  maxStates: number;
  /** buttons shown after "Add a state" (e.g. save) */
  actions?: ReactNode;
  /** phone: every control at least 44 px high, and a "start here" button on each later state */
  touch?: boolean;
  /** shown at the foot of state i's card (e.g. the problems found in it) */
  stateNote?: (i: number) => ReactNode;
}) {
  const setState = (i: number, change: (s: State) => State) =>
    onChange({ ...value, states: value.states.map((s, j) => (j === i ? change(s) : s)) });
  const control = touch ? 'min-h-11 min-w-14 text-base' : 'min-h-9';
  return (
    <>
      <ol
        className="flex flex-col gap-2 text-sm"
        aria-label="States: the action of each state and the next state after each observed profile (own, partner)"
      >
        {value.states.map((s, i) => (
          <li key={i} className="rounded-md border border-slate-200 px-3 py-2">
            <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
              <span className="font-semibold">
                State {i + 1}
                {i === 0 ? <span className="font-normal text-slate-600"> (start)</span> : null}
              </span>
              <label className="flex items-center gap-2">
                <span className="text-slate-600">plays</span>
                <select
                  aria-label={`State ${i + 1} plays`}
                  value={s.action}
                  onChange={(e) => setState(i, (st) => ({ ...st, action: e.target.value as Action }))}
                  className={`${control} rounded border border-slate-300 bg-white px-2`}
                >
                  <option value="C">C</option>
                  <option value="D">D</option>
                </select>
              </label>
              {i > 0 ? (
                <span className="ml-auto flex gap-1">
                  {touch ? (
                    <button
                      type="button"
                      onClick={() => onChange(withStart(value, i))}
                      className={`${control} rounded px-2 font-semibold text-accent-700 hover:bg-accent-50`}
                    >
                      Start here<span className="sr-only"> (state {i + 1} becomes state 1)</span>
                    </button>
                  ) : null}
                  <button
                    type="button"
                    onClick={() => onChange(withoutState(value, i))}
                    className={`${control} rounded px-2 font-semibold text-danger-600 hover:bg-danger-50`}
                  >
                    Remove<span className="sr-only"> state {i + 1}</span>
                  </button>
                </span>
              ) : null}
            </div>
            <div className={`mt-2 grid gap-x-3 gap-y-2 ${touch ? 'grid-cols-1 min-[22rem]:grid-cols-2' : 'grid-cols-2'}`}>
              {PROFILES.map((p) => (
                <label key={p} className="flex items-center justify-between gap-2">
                  <span className="text-slate-600">Next {PROFILE_WORDS[p]}</span>
                  <select
                    aria-label={`State ${i + 1}, next ${PROFILE_WORDS[p]}`}
                    value={s.next[p]}
                    onChange={(e) => setState(i, (st) => ({ ...st, next: { ...st.next, [p]: Number(e.target.value) } }))}
                    className={`${control} rounded border border-slate-300 bg-white px-2`}
                  >
                    {value.states.map((_, j) => (
                      <option key={j} value={j}>
                        {j + 1}
                      </option>
                    ))}
                  </select>
                </label>
              ))}
            </div>
            {stateNote?.(i)}
          </li>
        ))}
      </ol>
      <div className="flex flex-wrap gap-2">
        <Button type="button" variant="secondary" disabled={value.states.length >= maxStates} onClick={() => onChange(withNewState(value))}>
          Add a state
        </Button>
        {actions}
      </div>
    </>
  );
}
