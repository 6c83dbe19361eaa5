/**
 * A computer partner's strategy in plain words, as a clause that follows "a computer that …" and
 * speaks to the participant it plays against: "starts with X and then copies what you did last
 * round". The literature's names (TFT, Grim) mean nothing to a student, and disclosure is only
 * disclosure if it is understood (product.md: computer partners are always disclosed).
 *
 * Read from the automaton where its shape says it all: one action in every state ("always"),
 * or a next action that depends only on the last round (the same after every round, copy the
 * partner, do the opposite, or same/different).
 * The longer memories of the library are worded by hand; tests/unit/strategy-words.test.ts
 * plays every library automaton against every short history and checks it does what its words
 * say. Source of the automata: Dal Bó & Fréchette (2011); Fudenberg, Rand & Dreber (2012).
 */
import { type Action, type Automaton, LIBRARY, PROFILES, type Profile } from './automata';

type Labels = { C: string; D: string };

const flip = (a: Action): Action => (a === 'C' ? 'D' : 'C');

/** The next action as a function of last round's profile alone, or null if the state matters too. */
function memoryOne(a: Automaton): Record<Profile, Action> | null {
  const out = {} as Record<Profile, Action>;
  for (const p of PROFILES) {
    const actions = new Set(a.states.map((s) => a.states[s.next[p]].action));
    if (actions.size !== 1) return null;
    out[p] = [...actions][0];
  }
  return out;
}

/** Words read from the automaton itself, when its shape allows. */
function generated(a: Automaton, l: Labels): string | null {
  const first = a.states[0].action;
  if (a.states.every((s) => s.action === first)) return `always chooses ${l[first]}`;
  const m = memoryOne(a);
  if (!m) return null;
  // The automaton's profile is its own action first, then its partner's (the participant's).
  if (PROFILES.every((p) => m[p] === m.cc)) return `chooses ${l[first]} in the first round and ${l[m.cc]} in every round after that`;
  if (PROFILES.every((p) => m[p] === p[1].toUpperCase())) return `starts with ${l[first]} and then copies what you did last round`;
  if (PROFILES.every((p) => m[p] === flip(p[1].toUpperCase() as Action)))
    return `starts with ${l[first]} and then does the opposite of what you did last round`;
  if (m.cc === m.dd && m.cd === m.dc && m.cc !== m.cd) {
    return `starts with ${l[first]}; then it chooses ${l[m.cc]} after a round in which the two of you chose the same, and ${l[m.cd]} after a round in which you chose differently`;
  }
  return null;
}

function handWritten(id: string, l: Labels): string | null {
  const { C: x, D: y } = l;
  const words: Record<string, string> = {
    Grim: `starts with ${x} and keeps choosing ${x} until you choose ${y}; from then on it chooses ${y} for the rest of the supergame`,
    T2: `starts with ${x}; each time you choose ${y} while it chooses ${x}, it chooses ${y} in the next two rounds, whatever you do, and then goes back to ${x}`,
    TF2T: `starts with ${x} and chooses ${y} only after you chose ${y} in each of the last two rounds`,
    TF3T: `starts with ${x} and chooses ${y} only after you chose ${y} in each of the last three rounds`,
    '2TFT': `starts with ${x}, and chooses ${y} in the two rounds after each round in which you chose ${y}`,
    Grim2: `starts with ${x} and keeps choosing ${x} until you have chosen ${y} in two rounds in a row; from then on it chooses ${y} for the rest of the supergame`,
    Grim3: `starts with ${x} and keeps choosing ${x} until you have chosen ${y} in three rounds in a row; from then on it chooses ${y} for the rest of the supergame`,
  };
  return words[id] ?? null;
}

/**
 * The clause for a library strategy, or for any automaton: a strategy the library does not know
 * is still described by its first move and the fact that it reacts to the last rounds.
 */
export function strategyInWords(strategy: string | Automaton, labels: Labels): string {
  const a = typeof strategy === 'string' ? LIBRARY.find((s) => s.id === strategy) : strategy;
  if (!a) return 'follows a fixed plan set before the session, the same for every participant it plays';
  return (
    generated(a, labels) ??
    handWritten(a.id, labels) ??
    `starts with ${labels[a.states[0].action]} and then follows a fixed plan that reacts to what the two of you chose in earlier rounds`
  );
}
