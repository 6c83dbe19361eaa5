// Every library strategy has plain words for the participant, and the words say what the
// automaton does: each rule below is written from the words alone and compared, round by round,
// with the automaton against every sequence of the participant's choices up to 7 rounds.
// Source of the automata: Dal Bó & Fréchette (2011); Fudenberg, Rand & Dreber (2012).
import { describe, expect, it } from 'vitest';
import { type Action, type Automaton, LIBRARY, libraryStrategy, prescribedActions } from '#app/lib/automata';
import { strategyInWords } from '#app/lib/strategy-words';

const L = { C: 'Cooperate', D: 'Defect' };

/** What the computer does in round t (0-based), read from its words: `you` = the participant's past choices. */
type Rule = (you: readonly Action[], t: number, own: readonly Action[]) => Action;
const lastK = (you: readonly Action[], t: number, k: number) => t >= k && you.slice(t - k, t).every((a) => a === 'D');
const RULES: Record<string, Rule> = {
  // "always chooses Cooperate"
  ALLC: () => 'C',
  ALLD: () => 'D',
  // "starts with X and keeps choosing X until you choose Y; from then on Y"
  Grim: (you, t) => (you.slice(0, t).includes('D') ? 'D' : 'C'),
  // "starts with X and then copies what you did last round"
  TFT: (you, t) => (t === 0 ? 'C' : you[t - 1]),
  STFT: (you, t) => (t === 0 ? 'D' : you[t - 1]),
  // "X after a round in which the two of you chose the same, Y after a round in which you chose differently"
  WSLS: (you, t, own) => (t === 0 ? 'C' : own[t - 1] === you[t - 1] ? 'C' : 'D'),
  // "each time you choose Y while it chooses X, Y in the next two rounds, whatever you do, then back to X"
  T2: (you, t, own) => {
    if (t === 0) return 'C';
    for (const back of [1, 2]) {
      const r = t - back;
      if (r >= 0 && own[r] === 'C' && you[r] === 'D') return 'D';
    }
    return 'C';
  },
  // "chooses Y only after you chose Y in each of the last two (three) rounds"
  TF2T: (you, t) => (lastK(you, t, 2) ? 'D' : 'C'),
  TF3T: (you, t) => (lastK(you, t, 3) ? 'D' : 'C'),
  // "Y in the two rounds after each round in which you chose Y"
  '2TFT': (you, t) => (you[t - 1] === 'D' || you[t - 2] === 'D' ? 'D' : 'C'),
  // "until you have chosen Y in two (three) rounds in a row; from then on Y"
  Grim2: (you, t) => (Array.from({ length: t }, (_, r) => lastK(you, r + 1, 2)).some(Boolean) ? 'D' : 'C'),
  Grim3: (you, t) => (Array.from({ length: t }, (_, r) => lastK(you, r + 1, 3)).some(Boolean) ? 'D' : 'C'),
  // "chooses X in the first round and Y in every round after that"
  CtoD: (_you, t) => (t === 0 ? 'C' : 'D'),
};

/** The computer's choices against the participant's `you`, played by the automaton itself. */
function play(a: Automaton, you: readonly Action[]): Action[] {
  const own: Action[] = [];
  for (let t = 0; t < you.length; t++) own.push(prescribedActions(a, [...own, 'C'], [...you.slice(0, t), 'C'])[t]);
  return own;
}

function* sequences(n: number): Generator<Action[]> {
  for (let mask = 0; mask < 2 ** n; mask++) yield Array.from({ length: n }, (_, i) => ((mask >> i) & 1 ? 'D' : 'C'));
}

describe('a computer partner in plain words', () => {
  it('says what tit-for-tat does as a student would put it, never its name', () => {
    expect(strategyInWords('TFT', L)).toBe('starts with Cooperate and then copies what you did last round');
    expect(strategyInWords('ALLD', { C: 'Blue', D: 'Green' })).toBe('always chooses Green');
  });

  it.each(LIBRARY.map((a) => [a.id, a] as const))('%s: has words of its own, in the design’s labels', (id) => {
    const words = strategyInWords(id, { C: 'Blue', D: 'Green' });
    expect(words).not.toMatch(/fixed plan|fixed rule/);
    expect(words).not.toContain(id);
    expect(words).not.toContain(libraryStrategy(id).name);
    expect(words).not.toMatch(/cooperat|defect/i);
    // The first move the words name is the automaton's.
    expect(words).toMatch(
      new RegExp(`^(always chooses|starts with|chooses) ${libraryStrategy(id).states[0].action === 'C' ? 'Blue' : 'Green'}`),
    );
  });

  it('has a rule written from the words for every library strategy', () => {
    expect(Object.keys(RULES).sort()).toEqual(LIBRARY.map((a) => a.id).sort());
  });

  it.each(LIBRARY.map((a) => [a.id, a] as const))('%s: does what its words say against every choice sequence up to 7 rounds', (id, a) => {
    const rule = RULES[id];
    for (let n = 1; n <= 7; n++) {
      for (const you of sequences(n)) {
        const own = play(a, you);
        const said = you.map((_, t) => rule(you, t, own));
        expect(own, `${id} against ${you.join('')}`).toEqual(said);
      }
    }
  });

  it('describes a strategy it does not know by its first move, without pretending to know more', () => {
    const odd: Automaton = {
      id: 'mine',
      name: 'Mine',
      states: [
        { action: 'D', next: { cc: 1, cd: 0, dc: 1, dd: 1 } },
        { action: 'C', next: { cc: 2, cd: 0, dc: 0, dd: 0 } },
        { action: 'C', next: { cc: 0, cd: 0, dc: 0, dd: 0 } },
      ],
    };
    expect(strategyInWords(odd, L)).toBe(
      'starts with Defect and then follows a fixed plan that reacts to what the two of you chose in earlier rounds',
    );
    expect(strategyInWords('NoSuch', L)).not.toContain('NoSuch');
  });
});
