import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { libraryStrategy, LIBRARY, type Automaton } from '#app/lib/automata';
import {
  breakingDeviation,
  checkStrategy,
  formatIntervals,
  inIntervals,
  isNash,
  isSPE,
  nashIntervals,
  speIntervals,
  type DeltaInterval,
} from '#app/lib/equilibrium';
import type { StageGame } from '#app/lib/stage-game';
import { grimSPE, tftNash, tftSPE, wslsSPE } from '#app/lib/thresholds';
import { arbAutomaton, arbGame, expectClose } from './helpers';

const S = (id: string) => libraryStrategy(id);
const AXELROD = { T: 5, R: 3, P: 1, S: 0 };
const DBF32 = { T: 50, S: 12, P: 25, R: 32 };
const KNIFE = { T: 3, R: 2, P: 0, S: -1 };

const ACC = 1e-9; // required accuracy of interval ends (brief)

function expectFromTo(ivs: DeltaInterval[], lo: number): void {
  expect(ivs).toHaveLength(1);
  expect(Math.abs(ivs[0].lo - lo)).toBeLessThanOrEqual(ACC);
  expect(ivs[0]).toMatchObject({ hi: 1, loClosed: true, hiClosed: false });
}

function expectPoint(ivs: DeltaInterval[], at: number): void {
  expect(ivs).toHaveLength(1);
  expect(ivs[0].lo).toBe(ivs[0].hi);
  expect(Math.abs(ivs[0].lo - at)).toBeLessThanOrEqual(ACC);
  expect(ivs[0]).toMatchObject({ loClosed: true, hiClosed: true });
}

const WHOLE: DeltaInterval[] = [{ lo: 0, hi: 1, loClosed: false, hiClosed: false }];

describe('closed forms of methods.md §1 on the named payoffs', () => {
  it("Axelrod's payoffs: grim [1/2, 1), TFT Nash [2/3, 1), TFT and WSLS never SPE", () => {
    // Source: payoffs Axelrod (1984), p. 8; thresholds methods.md §1 check values [calc].
    const grim = checkStrategy(S('Grim'), AXELROD);
    expectFromTo(grim.nash, 1 / 2);
    expectFromTo(grim.spe, 1 / 2);
    const tft = checkStrategy(S('TFT'), AXELROD);
    expectFromTo(tft.nash, 2 / 3);
    expect(tft.spe).toEqual([]);
    expect(speIntervals(S('WSLS'), AXELROD)).toEqual([]);
  });

  it('the classroom case T=4, R=3, P=2, S=1: grim and TFT Nash both from 1/2', () => {
    // Source: methods.md §1 [common practice].
    const g = { T: 4, R: 3, P: 2, S: 1 };
    expectFromTo(speIntervals(S('Grim'), g), 1 / 2);
    expectFromTo(nashIntervals(S('TFT'), g), 1 / 2);
  });

  it('R=2, T=3, S=−1, P=0: TFT is SPE only at δ = 1/3; WSLS from g = 1/2', () => {
    // Source: methods.md §1 [calc; example Mailath & Samuelson, mem]; WSLS threshold g [calc].
    expectPoint(speIntervals(S('TFT'), KNIFE), 1 / 3);
    expect(isSPE(S('TFT'), KNIFE, 1 / 3).holds).toBe(true);
    expect(isSPE(S('TFT'), KNIFE, 1 / 3 + 1e-6).holds).toBe(false);
    expectFromTo(speIntervals(S('WSLS'), KNIFE), 1 / 2);
  });

  it('Dal Bó & Fréchette (2011) payoffs: grim SPE from δ_SPE, TFT Nash from the table', () => {
    // Source: methods.md §1 table (T=50, S=12, P=25) [calc].
    for (const [R, dSPE, tft] of [
      [32, 18 / 25, 9 / 10],
      [40, 2 / 5, 2 / 5],
      [48, 2 / 25, 2 / 25],
    ]) {
      const g = { T: 50, S: 12, P: 25, R };
      expectFromTo(speIntervals(S('Grim'), g), dSPE);
      expectFromTo(nashIntervals(S('TFT'), g), tft);
    }
  });

  it('ALLD is always SPE; ALLC is never Nash', () => {
    // Source: methods.md §1 (stage-game Nash repeated; ALLC is exploited by ALLD).
    expect(checkStrategy(S('ALLD'), AXELROD)).toEqual({ nash: WHOLE, spe: WHOLE });
    expect(nashIntervals(S('ALLC'), AXELROD)).toEqual([]);
  });

  it('T2 with Axelrod payoffs is SPE iff (R−P)(δ+δ²) ≥ T−R, i.e. δ ≥ (√5−1)/2', () => {
    // Source: one-shot deviation [calc] — defecting at cooperation costs two rounds of P.
    expectFromTo(speIntervals(S('T2'), AXELROD), (Math.sqrt(5) - 1) / 2);
  });

  it('STFT is Nash iff δ ≤ min{(P−S)/(T−P), (P−S)/(R−S)}: an interval closed on the right', () => {
    // Source: [calc] the deviator's MDP against STFT has four policies: always D (P forever),
    // alternate C, D (S, T, …), C forever (S then R), D in STFT's C-state only (= always D).
    for (const g of [AXELROD, DBF32]) {
      const hi = Math.min((g.P - g.S) / (g.T - g.P), (g.P - g.S) / (g.R - g.S));
      const ivs = nashIntervals(S('STFT'), g);
      expect(ivs).toHaveLength(1);
      expect(ivs[0]).toMatchObject({ lo: 0, loClosed: false, hiClosed: true });
      expect(Math.abs(ivs[0].hi - hi)).toBeLessThanOrEqual(ACC);
    }
  });
});

describe('isNash and isSPE at one δ', () => {
  it('(3/4, 32): grim SPE, TFT not Nash — alternating earns 134.857 > 128', () => {
    // Source: methods.md §1 note [calc].
    expect(isSPE(S('Grim'), DBF32, 0.75).holds).toBe(true);
    const n = isNash(S('TFT'), DBF32, 0.75);
    expect(n.holds).toBe(false);
    expect(n.bestValue).toBeCloseTo(134.857, 3);
    expectClose(n.value, 128);
    expectClose(n.gain, (50 + 0.75 * 12) / (1 - 0.75 ** 2) - 128);
  });

  it('TFT is Nash exactly at its threshold 2/3 (Axelrod): cooperating ties alternating at V = 9', () => {
    // Source: methods.md §1 check values (V = 9, 9, 7 at δ = 2/3) [calc].
    const n = isNash(S('TFT'), AXELROD, 2 / 3);
    expect(n.holds).toBe(true);
    expectClose(n.bestValue, 9);
  });

  it('TFT fails SPE after (D,D) when δ > (P−S)/(T−P)', () => {
    // Source: one-shot deviation at (D,D) [calc]: P/(1−δ) = 10 against S + δ(T+δS)/(1−δ²) = 23.684.
    const r = isSPE(S('TFT'), AXELROD, 0.9);
    expect(r.holds).toBe(false);
    expect(r.history).toEqual(['dd']);
    expect(r.state).toEqual([1, 1]);
    expectClose(r.conformValue, 10);
    expectClose(r.deviationValue, (0.9 * 5) / (1 - 0.81));
  });
});

describe('breakingDeviation', () => {
  it('TFT at δ = 0.75, T=50, S=12, P=25, R=32: "alternating beats TFT at δ = 0.75: 134.857 > 128"', () => {
    // Source: methods.md §1 note [calc].
    const d = breakingDeviation(S('TFT'), DBF32, 0.75);
    expect(d.kind).toBe('alternate');
    expect(d.text).toBe('alternating beats TFT at δ = 0.75: 134.857 > 128');
  });

  it('Grim at δ = 0.5, R = 32: always defecting, 75 > 64', () => {
    // Source: [calc] T + δP/(1−δ) = 50 + 25 = 75 against R/(1−δ) = 64 (below δ_SPE = 18/25, methods.md §1).
    expect(breakingDeviation(S('Grim'), DBF32, 0.5).text).toBe('always defecting beats Grim at δ = 0.5: 75 > 64');
  });

  it('one-shot deviations off the path, and "none" at the knife edge', () => {
    // Source: [calc] as in the isSPE test above; knife edge methods.md §1.
    expect(breakingDeviation(S('TFT'), AXELROD, 0.9).text).toBe(
      'after (D,D), cooperating once instead of defecting beats TFT at δ = 0.9: 23.684 > 10 (TFT is a Nash equilibrium but not subgame perfect)',
    );
    expect(breakingDeviation(S('TFT'), KNIFE, 1 / 3).kind).toBe('none');
  });

  it('names a deviation followed by conforming', () => {
    // Source: [calc] F ignores round 1 and is grim from round 2 on, so at δ = 0.9 (above grim's
    // 1/2) the best reply defects in round 1 only: T + δR/(1−δ) = 5 + 27 = 32 > R/(1−δ) = 30.
    const F: Automaton = {
      id: 'F',
      name: 'grim that ignores round 1',
      states: [
        { action: 'C', next: { cc: 1, cd: 1, dc: 1, dd: 1 } },
        { action: 'C', next: { cc: 1, cd: 2, dc: 2, dd: 2 } },
        { action: 'D', next: { cc: 2, cd: 2, dc: 2, dd: 2 } },
      ],
    };
    const d = breakingDeviation(F, AXELROD, 0.9);
    expect(d.kind).toBe('deviate-then-conform');
    expect(d.text).toBe('defecting in round 1, then following F beats F at δ = 0.9: 32 > 30');
    expect(d.actions).toEqual({ prefix: ['D'], cycle: ['C'] });
  });
});

describe('properties for random payoffs: the checker reproduces the closed forms', () => {
  // Source: closed forms of methods.md §1 (thresholds.ts); the checker never uses them.
  it('grim Nash and SPE = [(T−R)/(T−P), 1)', () => {
    fc.assert(
      fc.property(arbGame, (g) => {
        const r = checkStrategy(S('Grim'), g);
        expectFromTo(r.nash, grimSPE(g));
        expectFromTo(r.spe, grimSPE(g));
      }),
      { numRuns: 60 },
    );
  });

  it('TFT Nash = [max{(T−R)/(T−P), (T−R)/(R−S)}, 1) or never', () => {
    fc.assert(
      fc.property(arbGame, (g) => {
        const t = tftNash(g).threshold;
        const ivs = nashIntervals(S('TFT'), g);
        if (t < 1) expectFromTo(ivs, t);
        else expect(ivs).toEqual([]);
      }),
      { numRuns: 60 },
    );
  });

  it('TFT SPE = the knife edge or never', () => {
    fc.assert(
      fc.property(arbGame, (g) => {
        const t = tftSPE(g);
        const ivs = speIntervals(S('TFT'), g);
        if (t.kind === 'knife-edge') expectPoint(ivs, t.delta);
        else expect(ivs).toEqual([]);
      }),
      { numRuns: 60 },
    );
  });

  it('TFT SPE on random knife-edge games (T−R)/(R−S) = (P−S)/(T−P) = δ*', () => {
    // Source: methods.md §1; [calc] with R = b+a, P = b, T = b + a(1+x), S = b − a x and
    // x = δ*/(1−δ*) both ratios equal δ* (R=2, T=3, S=−1, P=0 is δ* = 1/3).
    fc.assert(
      fc.property(
        fc.double({ min: 0.02, max: 0.98, noNaN: true }),
        fc.double({ min: 0.5, max: 20, noNaN: true }),
        fc.double({ min: -10, max: 10, noNaN: true }),
        (d, a, b) => {
          const x = d / (1 - d);
          const g: StageGame = { R: b + a, P: b, T: b + a * (1 + x), S: b - a * x };
          const t = tftSPE(g);
          expect(t.kind).toBe('knife-edge');
          expectPoint(speIntervals(S('TFT'), g), d);
        },
      ),
      { numRuns: 60 },
    );
  });

  it('WSLS SPE = [(T−R)/(R−P), 1) when 2R > T+P, else never', () => {
    fc.assert(
      fc.property(arbGame, (g) => {
        const w = wslsSPE(g);
        const ivs = speIntervals(S('WSLS'), g);
        if (w === null) expect(ivs).toEqual([]);
        else expectFromTo(ivs, w);
      }),
      { numRuns: 60 },
    );
  });

  it('ALLD always SPE, ALLC never Nash', () => {
    fc.assert(
      fc.property(arbGame, (g) => {
        expect(speIntervals(S('ALLD'), g)).toEqual(WHOLE);
        expect(nashIntervals(S('ALLC'), g)).toEqual([]);
      }),
      { numRuns: 30 },
    );
  });
});

/** Truncated-sum value of a deterministic play path, an independent reference for the solvers. */
function simulate(
  a: Automaton,
  b: Automaton,
  g: StageGame,
  delta: number,
  start: [number, number],
  firstAction?: 'C' | 'D',
  rounds = 4000,
): number {
  const u = (x: string, y: string) => (x === 'C' ? (y === 'C' ? g.R : g.S) : y === 'C' ? g.T : g.P);
  let [i, j] = start;
  let v = 0;
  let w = 1;
  for (let t = 0; t < rounds; t++) {
    const x = t === 0 && firstAction ? firstAction : a.states[i].action;
    const y = b.states[j].action;
    v += w * u(x, y);
    w *= delta;
    const p1 = `${x.toLowerCase()}${y.toLowerCase()}` as 'cc';
    const p2 = `${y.toLowerCase()}${x.toLowerCase()}` as 'cc';
    i = a.states[i].next[p1];
    j = b.states[j].next[p2];
  }
  return v;
}

/** Policy (one action per opponent state) as an automaton whose state mirrors the opponent's. */
function policyAgainst(s: Automaton, bits: number): Automaton {
  // The deviator tracks s's state itself: its state k plays bit k and moves as s would move
  // after seeing (s's action, deviator's action).
  return {
    id: 'pol',
    name: 'pol',
    states: s.states.map((st, k) => {
      const x: 'C' | 'D' = (bits >> k) & 1 ? 'D' : 'C';
      const y = st.action;
      const to = (dx: 'C' | 'D') => st.next[`${y.toLowerCase()}${dx.toLowerCase()}` as 'cc'];
      const t = to(x);
      return { action: x, next: { cc: t, cd: t, dc: t, dd: t } };
    }),
  };
}

describe('against brute force on random automata', () => {
  it('isNash best value = max over all stationary policies, by simulation', () => {
    // Source: [calc] discounted finite MDPs have a stationary optimal policy (Mailath &
    // Samuelson 2006, ch. 2 [mem]); every policy is simulated for 4000 rounds (δ ≤ 0.9).
    fc.assert(
      fc.property(arbAutomaton(4), arbGame, fc.double({ min: 0.05, max: 0.9, noNaN: true }), (s, g, d) => {
        let best = -Infinity;
        for (let bits = 0; bits < 1 << s.states.length; bits++) {
          best = Math.max(best, simulate(policyAgainst(s, bits), s, g, d, [0, 0]));
        }
        const n = isNash(s, g, d);
        const scale = (Math.abs(g.T) + Math.abs(g.S)) / (1 - d);
        expect(Math.abs(n.bestValue - best)).toBeLessThanOrEqual(1e-9 * scale);
        expect(Math.abs(n.value - simulate(s, s, g, d, [0, 0]))).toBeLessThanOrEqual(1e-9 * scale);
      }),
      { numRuns: 150 },
    );
  });

  it('isSPE gain = max one-shot gain over all reachable joint states, by simulation', () => {
    // Source: one-shot deviation principle (methods.md §4), reachable states by breadth-first
    // search over all four profiles, values simulated.
    fc.assert(
      fc.property(arbAutomaton(3), arbGame, fc.double({ min: 0.05, max: 0.9, noNaN: true }), (s, g, d) => {
        const n = s.states.length;
        const seen = new Set<number>([0]);
        const queue: [number, number][] = [[0, 0]];
        for (let q = 0; q < queue.length; q++) {
          const [i, j] = queue[q];
          for (const x of ['c', 'd']) {
            for (const y of ['c', 'd']) {
              const ni = s.states[i].next[`${x}${y}` as 'cc'];
              const nj = s.states[j].next[`${y}${x}` as 'cc'];
              if (!seen.has(ni * n + nj)) {
                seen.add(ni * n + nj);
                queue.push([ni, nj]);
              }
            }
          }
        }
        let gain = -Infinity;
        for (const [i, j] of queue) {
          const conform = simulate(s, s, g, d, [i, j]);
          const dev = simulate(s, s, g, d, [i, j], s.states[i].action === 'C' ? 'D' : 'C');
          gain = Math.max(gain, dev - conform);
        }
        const r = isSPE(s, g, d);
        const scale = (Math.abs(g.T) + Math.abs(g.S)) / (1 - d);
        expect(Math.abs(r.gain - gain)).toBeLessThanOrEqual(1e-9 * scale);
      }),
      { numRuns: 150 },
    );
  });

  it('the intervals agree with the pointwise checks', () => {
    // Source: consistency of nashIntervals/speIntervals with isNash/isSPE [calc].
    fc.assert(
      fc.property(arbAutomaton(4), arbGame, fc.double({ min: 0.001, max: 0.999, noNaN: true }), (s, g, d) => {
        const r = checkStrategy(s, g);
        const near = (ivs: DeltaInterval[]) => ivs.some((iv) => Math.abs(iv.lo - d) < 1e-7 || Math.abs(iv.hi - d) < 1e-7);
        if (!near(r.nash)) expect(inIntervals(r.nash, d)).toBe(isNash(s, g, d).holds);
        if (!near(r.spe)) expect(inIntervals(r.spe, d)).toBe(isSPE(s, g, d).holds);
        // SPE ⊆ Nash
        if (isSPE(s, g, d).holds) expect(isNash(s, g, d).holds).toBe(true);
      }),
      { numRuns: 200 },
    );
  });
});

describe('formatting', () => {
  it('prints intervals with their ends', () => {
    // Source: thresholds of methods.md §1 for Axelrod's payoffs and the knife edge [calc].
    expect(formatIntervals(nashIntervals(S('TFT'), AXELROD))).toBe('[0.666667, 1)');
    expect(formatIntervals(speIntervals(S('TFT'), KNIFE))).toBe('{0.333333}');
    expect(formatIntervals(speIntervals(S('ALLD'), KNIFE))).toBe('(0, 1)');
    expect(formatIntervals([])).toBe('never');
  });

  it('for every library strategy the SPE set lies inside the Nash set', () => {
    // Source: definitions (a subgame-perfect profile is Nash in the whole game), methods.md §4.
    for (const g of [AXELROD, DBF32, KNIFE]) {
      for (const s of LIBRARY) {
        const r = checkStrategy(s, g);
        for (const iv of r.spe) {
          // closed ends are found independently for the two sets, each to ~1e-12 (TOL_REL), so
          // probe 1e-9 inside them; a knife-edge point is probed as it is
          const probes = iv.lo === iv.hi ? [iv.lo] : [iv.lo + 1e-9, (iv.lo + iv.hi) / 2, iv.hi - 1e-9];
          for (const d of probes) expect(inIntervals(r.nash, d)).toBe(true);
        }
      }
    }
  });
});
