import { expect } from 'vitest';
import fc from 'fast-check';
import type { Automaton } from '#app/lib/automata';
import type { StageGame } from '#app/lib/stage-game';

/** |actual − expected| ≤ rel·max(1, |expected|) */
export function expectClose(actual: number, expected: number, rel = 1e-12): void {
  const tol = rel * Math.max(1, Math.abs(expected));
  expect(Math.abs(actual - expected), `expected ${actual} to be within ${tol} of ${expected}`).toBeLessThanOrEqual(tol);
}

/**
 * Random prisoner's dilemmas with integer payoffs, T > R > P > S. Gaps of at least 1 on a range
 * of ±60 keep every threshold at least ~1/90 away from 1, inside the checker's δ sample.
 */
export const arbGame: fc.Arbitrary<StageGame> = fc
  .record({
    P: fc.integer({ min: -20, max: 20 }),
    a: fc.integer({ min: 1, max: 20 }),
    b: fc.integer({ min: 1, max: 30 }),
    c: fc.integer({ min: 1, max: 30 }),
  })
  .map(({ P, a, b, c }) => ({ P, S: P - a, R: P + b, T: P + b + c }));

export const arbDelta: fc.Arbitrary<number> = fc.double({ min: 0.01, max: 0.99, noNaN: true });

/** Plays D, C, D, C, … whatever happens — the deviation that breaks tit-for-tat. */
export const ALTERNATE: Automaton = {
  id: 'ALT',
  name: 'Alternate D and C',
  states: [
    { action: 'D', next: { cc: 1, cd: 1, dc: 1, dd: 1 } },
    { action: 'C', next: { cc: 0, cd: 0, dc: 0, dd: 0 } },
  ],
};

/** Random valid automata with up to `maxStates` states; state i's dd transition is forced to i + 1 so every state is reachable. */
export function arbAutomaton(maxStates = 4): fc.Arbitrary<Automaton> {
  return fc.integer({ min: 1, max: maxStates }).chain((n) =>
    fc
      .record({
        actions: fc.array(fc.constantFrom<'C' | 'D'>('C', 'D'), { minLength: n, maxLength: n }),
        targets: fc.array(fc.integer({ min: 0, max: n - 1 }), { minLength: 4 * n, maxLength: 4 * n }),
      })
      .map(({ actions, targets }) => {
        // force reachability: state i's 'dd' transition goes to i + 1 (the last one's is free)
        const t = [...targets];
        for (let i = 0; i + 1 < n; i++) t[i * 4 + 3] = i + 1;
        return {
          id: `R${n}`,
          name: 'random',
          states: actions.map((action, i) => ({
            action,
            next: { cc: t[i * 4], cd: t[i * 4 + 1], dc: t[i * 4 + 2], dd: t[i * 4 + 3] },
          })),
        };
      }),
  );
}
