import { describe, expect, it } from 'vitest';
import { LIBRARY, libraryStrategy } from '#app/lib/automata';
import { readStrategyFile, toStrategyFile } from '#app/lib/strategy-file';

describe('strategy files', () => {
  it('write TFT as documented: states from 1, next keyed by own then partner action', () => {
    // Source: common practice (TFT: start with C, then copy the partner's last action).
    expect(toStrategyFile(libraryStrategy('TFT'))).toEqual({
      format: 'parley-strategy',
      version: 1,
      id: 'TFT',
      name: libraryStrategy('TFT').name,
      states: [
        { state: 1, plays: 'C', next: { CC: 1, CD: 2, DC: 1, DD: 2 } },
        { state: 2, plays: 'D', next: { CC: 1, CD: 2, DC: 1, DD: 2 } },
      ],
    });
  });

  it('read back every library strategy unchanged, through JSON text', () => {
    for (const a of LIBRARY) {
      const back = readStrategyFile(JSON.parse(JSON.stringify(toStrategyFile(a))));
      expect(back).toEqual({ ok: true, automaton: a });
    }
  });

  it('refuse bad files with a message per problem and no automaton', () => {
    const good = toStrategyFile(libraryStrategy('Grim'));
    const cases: [unknown, RegExp][] = [
      [{ ...good, format: 'other' }, /"format" must be "parley-strategy"/],
      [{ ...good, version: 2 }, /Only version 1/],
      [{ ...good, states: [] }, /at least one state/],
      [{ ...good, states: [{ ...good.states[0], plays: 'X' }, good.states[1]] }, /"plays" is "C" or "D"/],
      [{ ...good, states: [good.states[1], good.states[0]] }, /in order 1, 2, 3/],
      [{ ...good, states: [{ ...good.states[0], next: { CC: 3, CD: 2, DC: 2, DD: 2 } }, good.states[1]] }, /must point to a state 1–2/],
      [{ ...good, states: [{ ...good.states[0], next: { CC: 1, CD: 1, DC: 1, DD: 1 } }, good.states[1]] }, /cannot be reached/],
      ['not an object', /expected object/i],
    ];
    for (const [raw, message] of cases) {
      const r = readStrategyFile(raw);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.issues.map((i) => i.message).join(' ')).toMatch(message);
    }
  });
});
