/**
 * Strategies of the repeated prisoner's dilemma as finite automata (Moore machines).
 *
 * State 0 starts. Each state prescribes an action; the transition is chosen by the *observed*
 * profile of the last round, seen from this player's side: own action first, then the partner's.
 * Convention: strategies follow the observed actions of both players (own actual action, not the
 * one the strategy intended) — the convention that reproduces Dal Bó & Fréchette (2011) Table 7.
 * Source of the definitions: Dal Bó & Fréchette (2011); Fudenberg, Rand & Dreber (2012).
 */

export type Action = 'C' | 'D';

/** Last round's profile from one player's side: own action, then the partner's. */
export type Profile = 'cc' | 'cd' | 'dc' | 'dd';

export const PROFILES: readonly Profile[] = ['cc', 'cd', 'dc', 'dd'];

export interface AutomatonState {
  action: Action;
  /** index of the next state for each observed profile */
  next: Record<Profile, number>;
}

export interface Automaton {
  /** short name from the literature (ALLD, TFT, …) or a user's own */
  id: string;
  name: string;
  states: AutomatonState[];
}

export function profileOf(own: Action, partner: Action): Profile {
  return `${own.toLowerCase()}${partner.toLowerCase()}` as Profile;
}

/** The same profile seen from the partner's side. */
export function mirror(p: Profile): Profile {
  return `${p[1]}${p[0]}` as Profile;
}

const all = (s: number): Record<Profile, number> => ({ cc: s, cd: s, dc: s, dd: s });
/** transitions that depend only on the partner's action ("oC" / "oD") */
const onPartner = (ifC: number, ifD: number): Record<Profile, number> => ({
  cc: ifC,
  dc: ifC,
  cd: ifD,
  dd: ifD,
});
/** cc keeps going to `ifCC`, anything else to `otherwise` */
const onMutual = (ifCC: number, otherwise: number): Record<Profile, number> => ({
  cc: ifCC,
  cd: otherwise,
  dc: otherwise,
  dd: otherwise,
});

/** The library of standard strategies (methods.md §3). */
export const LIBRARY: readonly Automaton[] = [
  { id: 'ALLC', name: 'Always cooperate', states: [{ action: 'C', next: all(0) }] },
  { id: 'ALLD', name: 'Always defect', states: [{ action: 'D', next: all(0) }] },
  {
    id: 'Grim',
    name: 'Grim trigger',
    states: [
      { action: 'C', next: onMutual(0, 1) },
      { action: 'D', next: all(1) },
    ],
  },
  {
    id: 'TFT',
    name: 'Tit-for-tat',
    states: [
      { action: 'C', next: onPartner(0, 1) },
      { action: 'D', next: onPartner(0, 1) },
    ],
  },
  {
    id: 'STFT',
    name: 'Suspicious tit-for-tat',
    states: [
      { action: 'D', next: onPartner(1, 0) },
      { action: 'C', next: onPartner(1, 0) },
    ],
  },
  {
    id: 'WSLS',
    name: 'Win-stay, lose-shift',
    states: [
      { action: 'C', next: { cc: 0, dd: 0, cd: 1, dc: 1 } },
      { action: 'D', next: { cc: 0, dd: 0, cd: 1, dc: 1 } },
    ],
  },
  {
    id: 'T2',
    name: 'Trigger with two rounds of punishment',
    states: [
      { action: 'C', next: onMutual(0, 1) },
      { action: 'D', next: all(2) },
      { action: 'D', next: all(0) },
    ],
  },
  {
    id: 'TF2T',
    name: 'Tit-for-two-tats',
    states: [
      { action: 'C', next: onPartner(0, 1) },
      { action: 'C', next: onPartner(0, 2) },
      { action: 'D', next: onPartner(0, 2) },
    ],
  },
  {
    id: 'TF3T',
    name: 'Tit-for-three-tats',
    states: [
      { action: 'C', next: onPartner(0, 1) },
      { action: 'C', next: onPartner(0, 2) },
      { action: 'C', next: onPartner(0, 3) },
      { action: 'D', next: onPartner(0, 3) },
    ],
  },
  {
    id: '2TFT',
    name: 'Two-tits-for-tat',
    states: [
      { action: 'C', next: onPartner(0, 1) },
      { action: 'D', next: onPartner(2, 1) },
      { action: 'D', next: onPartner(0, 1) },
    ],
  },
  {
    id: 'Grim2',
    name: 'Grim after two non-cooperative rounds',
    states: [
      { action: 'C', next: onMutual(0, 1) },
      { action: 'C', next: onMutual(0, 2) },
      { action: 'D', next: all(2) },
    ],
  },
  {
    id: 'Grim3',
    name: 'Grim after three non-cooperative rounds',
    states: [
      { action: 'C', next: onMutual(0, 1) },
      { action: 'C', next: onMutual(0, 2) },
      { action: 'C', next: onMutual(0, 3) },
      { action: 'D', next: all(3) },
    ],
  },
  {
    id: 'CtoD',
    name: 'Cooperate once, then defect',
    states: [
      { action: 'C', next: all(1) },
      { action: 'D', next: all(1) },
    ],
  },
];

export function libraryStrategy(id: string): Automaton {
  const found = LIBRARY.find((a) => a.id === id);
  if (!found) throw new Error(`Unknown strategy "${id}"`);
  return found;
}

/** The strategy sets used in the literature, as presets. */
export const STRATEGY_SETS = {
  /** Dal Bó & Fréchette (2011) */
  dbf2011: ['ALLD', 'ALLC', 'Grim', 'TFT', 'WSLS', 'T2'],
} as const satisfies Record<string, readonly string[]>;

/** The action an automaton prescribes after a history of observed profiles (own, partner). */
export function prescribedActions(a: Automaton, own: readonly Action[], partner: readonly Action[]): Action[] {
  const out: Action[] = [];
  let s = 0;
  for (let t = 0; t < own.length; t++) {
    out.push(a.states[s].action);
    s = a.states[s].next[profileOf(own[t], partner[t])];
  }
  return out;
}
