import { describe, expect, it } from 'vitest';
import { LIBRARY, type Automaton } from '#app/lib/automata';
import { compileAutomaton, MAX_STATES, validateAutomaton } from '#app/lib/automaton-check';

const loop = { cc: 0, cd: 0, dc: 0, dd: 0 };

describe('validateAutomaton', () => {
  it('accepts every library strategy', () => {
    // Source: the definitions of methods.md §3 as encoded in automata.ts.
    for (const a of LIBRARY) expect(validateAutomaton(a)).toEqual([]);
  });

  it('needs at least one state', () => {
    expect(validateAutomaton({ id: 'x', name: 'x', states: [] })).toEqual([
      { path: 'states', message: 'A strategy needs at least one state.' },
    ]);
  });

  it(`allows at most ${MAX_STATES} states`, () => {
    const states = Array.from({ length: 13 }, (_, i) => ({
      action: 'C' as const,
      next: { cc: (i + 1) % 13, cd: 0, dc: 0, dd: 0 },
    }));
    expect(validateAutomaton({ id: 'x', name: 'x', states })).toEqual([
      { path: 'states', message: 'A strategy may have at most 12 states (this one has 13).' },
    ]);
  });

  it('names missing, out-of-range and non-integer transitions and bad actions', () => {
    const a = {
      id: 'bad',
      name: 'bad',
      states: [
        { action: 'X', next: { cc: 0, cd: 2, dc: 0.5 } },
        { action: 'D', next: { cc: 0, cd: 0, dc: 0, dd: -1 } },
      ],
    };
    expect(validateAutomaton(a)).toEqual([
      { path: 'states[0].action', message: 'State 1 must play C or D (got "X").' },
      { path: 'states[0].next.cd', message: "State 1's transition after CD (own C, partner D) must point to a state 1–2 (got 2)." },
      { path: 'states[0].next.dc', message: "State 1's transition after DC (own D, partner C) must point to a state 1–2 (got 0.5)." },
      { path: 'states[0].next.dd', message: 'State 1 has no transition after DD (own D, partner D).' },
      { path: 'states[1].next.dd', message: "State 2's transition after DD (own D, partner D) must point to a state 1–2 (got -1)." },
      { path: 'states[1]', message: 'State 2 cannot be reached from the starting state 1.' },
    ]);
  });

  it('flags states that no history reaches from state 1', () => {
    const a: Automaton = {
      id: 'u',
      name: 'u',
      states: [
        { action: 'C', next: { cc: 0, cd: 1, dc: 0, dd: 1 } },
        { action: 'D', next: loop },
        { action: 'D', next: { cc: 0, cd: 1, dc: 2, dd: 2 } },
      ],
    };
    expect(validateAutomaton(a)).toEqual([{ path: 'states[2]', message: 'State 3 cannot be reached from the starting state 1.' }]);
  });
});

describe('compileAutomaton', () => {
  it('codes profiles as own*2 + partner (cc, cd, dc, dd = 0…3) and actions C=0, D=1', () => {
    const tft = LIBRARY.find((a) => a.id === 'TFT')!;
    const c = compileAutomaton(tft);
    expect(Array.from(c.act)).toEqual([0, 1]);
    // TFT follows the partner: oC → state 0, oD → state 1 (methods.md §3)
    expect(Array.from(c.next)).toEqual([0, 1, 0, 1, 0, 1, 0, 1]);
  });

  it('refuses an invalid automaton with the messages', () => {
    expect(() => compileAutomaton({ id: 'e', name: 'e', states: [] })).toThrow(
      'Invalid strategy "e": A strategy needs at least one state.',
    );
  });
});
