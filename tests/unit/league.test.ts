import fc from 'fast-check';
import jstatPkg from 'jstat';
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { type Automaton, LIBRARY, libraryStrategy, profileOf, type Action } from '#app/lib/automata';
import { compileAutomaton } from '#app/lib/automaton-check';
import {
  classComparison,
  evolve,
  LEAGUE_MAX_STATES,
  leagueEntryIssues,
  pairTotals,
  previewPlay,
  roundRobin,
  simulatedRoundRobin,
  standings,
  survivors,
} from '#app/lib/league';
import { payoffTable, type StageGame } from '#app/lib/stage-game';
import { arbAutomaton, arbDelta, arbGame, expectClose } from './helpers';

const { jStat } = jstatPkg;
const S = (id: string) => libraryStrategy(id);
const DBF48 = { T: 50, S: 12, P: 25, R: 48 };
// Source: Axelrod (1984), p. 8: T = 5, R = 3, P = 1, S = 0.
const AXELROD = { T: 5, R: 3, P: 1, S: 0 };

const totals = (a: string, b: string, game: StageGame, delta: number, epsilon = 0) =>
  pairTotals(compileAutomaton(S(a)), compileAutomaton(S(b)), payoffTable(game), delta, epsilon);

/**
 * An independent value: the full product chain over ALL joint states (reachable or not), built
 * from the automata's profile tables as written, solved with ml-matrix. Shares no code with
 * app/lib/league.ts or values.ts.
 */
function referenceTotal(a: Automaton, b: Automaton, game: StageGame, delta: number, epsilon: number): number {
  const na = a.states.length;
  const nb = b.states.length;
  const n = na * nb;
  const pay = (own: Action, partner: Action) => (own === 'C' ? (partner === 'C' ? game.R : game.S) : partner === 'C' ? game.T : game.P);
  const flip = (x: Action): Action => (x === 'C' ? 'D' : 'C');
  const M = Matrix.eye(n, n);
  const r = new Array<number>(n).fill(0);
  for (let i = 0; i < na; i++)
    for (let j = 0; j < nb; j++) {
      const w = i * nb + j;
      const intendedA = a.states[i].action;
      const intendedB = b.states[j].action;
      for (const x of [intendedA, flip(intendedA)])
        for (const y of [intendedB, flip(intendedB)]) {
          const p = (x === intendedA ? 1 - epsilon : epsilon) * (y === intendedB ? 1 - epsilon : epsilon);
          if (p === 0) continue;
          r[w] += p * pay(x, y);
          const to = a.states[i].next[profileOf(x, y)] * nb + b.states[j].next[profileOf(y, x)];
          M.set(w, to, M.get(w, to) - delta * p);
        }
    }
  return solve(M, Matrix.columnVector(r)).get(0, 0);
}

describe('pair values', () => {
  it('reproduce the check matrix (T=50, S=12, P=25, R=48, δ = 3/4, ε = 0)', () => {
    // Source: methods.md §4 check matrix [calc]; closed forms ALLD vs WSLS = (T+δP)/(1−δ²),
    // ALLD vs T2 = (T+δP+δ²P)/(1−δ³), ALLD vs TF2T = T + δT + δ²P/(1−δ).
    const row = ['ALLD', 'ALLC', 'Grim', 'TFT', 'STFT', 'WSLS', 'T2', 'TF2T'].map((b) => totals('ALLD', b, DBF48, 0.75)[0]);
    [100, 200, 125, 125, 100, 157.143, 143.243, 143.75].forEach((v, k) => expect(row[k]).toBeCloseTo(v, 3));
    expect(totals('TFT', 'STFT', DBF48, 0.75)).toEqual([expect.closeTo(113.143, 3), expect.closeTo(134.857, 3)]);
    expect(totals('Grim', 'ALLD', DBF48, 0.75)[0]).toBeCloseTo(87, 9);
  });

  it('reproduce the noisy check (Axelrod payoffs, δ = 0.9, ε = 0.05), both players from one solve', () => {
    // Source: methods.md §4 noisy check [calc].
    const [tft, wsls] = totals('TFT', 'WSLS', AXELROD, 0.9, 0.05);
    expect(tft).toBeCloseTo(25.439374, 6);
    expect(wsls).toBeCloseTo(25.788711, 6);
    expect(totals('TFT', 'TFT', AXELROD, 0.9, 0.05)[0]).toBeCloseTo(26.49, 3);
    expect(totals('ALLD', 'ALLD', AXELROD, 0.9, 0.05)[0]).toBeCloseTo(11.475, 3);
  });

  it('agree with an independent solve (ml-matrix) for random automata, payoffs, δ and ε', () => {
    // Source: independent reference, ml-matrix `solve` on the full product chain (methods.md §7).
    fc.assert(
      fc.property(
        arbAutomaton(4),
        arbAutomaton(4),
        arbGame,
        arbDelta,
        fc.oneof(fc.constant(0), fc.double({ min: 0.001, max: 0.3, noNaN: true })),
        (a, b, g, d, e) => {
          const [va, vb] = pairTotals(compileAutomaton(a), compileAutomaton(b), payoffTable(g), d, e);
          const scale = (Math.max(Math.abs(g.T), Math.abs(g.S), Math.abs(g.P), Math.abs(g.R)) + 1) / (1 - d);
          expect(Math.abs(va - referenceTotal(a, b, g, d, e))).toBeLessThanOrEqual(1e-9 * scale);
          expect(Math.abs(vb - referenceTotal(b, a, g, d, e))).toBeLessThanOrEqual(1e-9 * scale);
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe('a league of the library strategies at Axelrod’s payoffs', () => {
  const settings = { game: AXELROD, delta: 0.9, epsilon: 0 };
  const table = roundRobin(LIBRARY, settings);

  it('has per-round values equal to an independent linear solve (ml-matrix), ranking included', () => {
    // Source: independent reference, ml-matrix `solve` (methods.md §7); per-round value (1−δ)V.
    const ref = LIBRARY.map((a) => LIBRARY.map((b) => (1 - settings.delta) * referenceTotal(a, b, AXELROD, settings.delta, 0)));
    table.forEach((row, i) => row.forEach((v, j) => expectClose(v, ref[i][j], 1e-10)));
    const mine = standings(table);
    const theirs = standings(ref);
    expect(mine.map((s) => s.entry)).toEqual(theirs.map((s) => s.entry));
    mine.forEach((s, k) => expectClose(s.score, theirs[k].score, 1e-10));
  });

  it('puts a nice reciprocator above ALLD, which comes last but for the unconditional cooperator', () => {
    // Source: Axelrod (1984), ch. 2: the nice, retaliating rules led; ALLD (not entered) and the
    // exploitable ALLC would trail. Values here are exact, so the order is a property of the set.
    const names = LIBRARY.map((a) => a.id);
    const rank = Object.fromEntries(standings(table).map((s) => [names[s.entry], s.rank]));
    expect(rank.TFT).toBeLessThan(rank.ALLD);
    expect(rank.Grim).toBeLessThan(rank.ALLD);
  });

  it('scores each entry by its mean over all entries, itself included', () => {
    const n = LIBRARY.length;
    const tft = LIBRARY.findIndex((a) => a.id === 'TFT');
    const score = standings(table).find((s) => s.entry === tft)!.score;
    expectClose(score, table[tft].reduce((s, v) => s + v, 0) / n, 1e-15);
    // TFT against itself cooperates forever: R per round. Source: common practice (definition of TFT).
    expectClose(table[tft][tft], AXELROD.R, 1e-12);
  });
});

describe('standings', () => {
  it('share a rank on equal scores and skip the next ("1, 2, 2, 4")', () => {
    // Source: common practice (standard competition ranking).
    const s = standings([
      [3, 3, 3, 3],
      [2, 2, 2, 2],
      [2, 2, 2, 2],
      [1, 1, 1, 1],
    ]);
    expect(s.map((r) => [r.entry, r.rank])).toEqual([
      [0, 1],
      [1, 2],
      [2, 2],
      [3, 4],
    ]);
  });
});

describe('simulated league', () => {
  const set = ['ALLD', 'ALLC', 'Grim', 'TFT', 'WSLS', 'T2'].map(S);
  const settings = { game: DBF48, delta: 0.75, epsilon: 0.05 };

  it('agrees with the exact values within sampling error: Σ z² over independent pairs passes a χ² test', () => {
    // Stated test: each pair i ≤ j draws its own substream, so the row player's estimates of the
    // 21 pairs are independent; z = (estimate − exact)/SE is ≈ N(0, 1) for 4,000 matches (CLT), so
    // Σ z² ~ χ²(21). Reject agreement only at the 0.1% level. Source: common practice (χ² test of
    // standardised means); the χ² tail from jstat (methods.md §7).
    const exact = roundRobin(set, settings);
    for (const seed of [1, 2, 3]) {
      const sim = simulatedRoundRobin(set, settings, { matches: 4000, seed });
      let stat = 0;
      let df = 0;
      for (let i = 0; i < set.length; i++)
        for (let j = i; j < set.length; j++) {
          const z = (sim.perRound[i][j] - exact[i][j]) / sim.standardError[i][j];
          stat += z * z;
          df++;
        }
      const p = 1 - jStat.chisquare.cdf(stat, df);
      expect(df).toBe(21);
      expect(p).toBeGreaterThan(0.001);
    }
  });

  it('is reproducible from its seed and shrinks its error like 1/√matches', () => {
    const a = simulatedRoundRobin(set, settings, { matches: 200, seed: 7 });
    const b = simulatedRoundRobin(set, settings, { matches: 200, seed: 7 });
    expect(b).toEqual(a);
    const big = simulatedRoundRobin(set, settings, { matches: 3200, seed: 7 });
    // 16× the matches → SE about 1/4. Source: common practice (SE of a mean = sd/√n).
    const ratio = big.standardError[3][3] / a.standardError[3][3];
    expect(ratio).toBeGreaterThan(0.15);
    expect(ratio).toBeLessThan(0.35);
  });
});

describe('evolution', () => {
  it('takes the discrete replicator step of the Grim/ALLD check', () => {
    // Source: methods.md §6 check [calc]: A = [[192, 87], [125, 100]], x = (0.2, 0.8), c = 0 →
    // x' = (0.2045454…, 0.7954545…).
    const A = [
      [192, 87],
      [125, 100],
    ];
    const run = evolve(A, 1, { start: [0.2, 0.8] });
    expect(run.background).toBe(0);
    expect(run.shares[1][0]).toBeCloseTo(0.2045454545, 9);
    expect(run.shares[1][1]).toBeCloseTo(0.7954545455, 9);
  });

  it('goes to Grim above the basin size 0.1625 and to ALLD below it', () => {
    // Source: methods.md §6 [calc]: the interior rest point, Grim share 0.1625 = sizeBAD.
    const A = [
      [192, 87],
      [125, 100],
    ];
    expect(survivors(evolve(A, 2000, { start: [0.17, 0.83] })).map((s) => s.entry)).toEqual([0]);
    expect(survivors(evolve(A, 2000, { start: [0.155, 0.845] })).map((s) => s.entry)).toEqual([1]);
  });

  it('starts from equal shares by default, keeps the simplex and states a positive background when payoffs can be negative', () => {
    const A = [
      [3, -2],
      [5, 0],
    ];
    const run = evolve(A, 50);
    expect(run.shares[0]).toEqual([0.5, 0.5]);
    expect(run.background).toBe(3); // 1 − min A
    for (const x of run.shares) {
      expect(x.every((v) => v >= 0)).toBe(true);
      expectClose(
        x.reduce((s, v) => s + v, 0),
        1,
        1e-12,
      );
    }
  });

  it('refuses starting shares of the wrong length or sign', () => {
    expect(() => evolve([[1]], 1, { start: [0.5, 0.5] })).toThrow(RangeError);
    expect(() =>
      evolve(
        [
          [1, 1],
          [1, 1],
        ],
        1,
        { start: [-1, 2] },
      ),
    ).toThrow(RangeError);
  });
});

describe('entries', () => {
  it('accept every library strategy and refuse more states than the league allows', () => {
    for (const a of LIBRARY) expect(leagueEntryIssues(a)).toEqual([]);
    const big: Automaton = {
      id: 'big',
      name: 'big',
      states: Array.from({ length: LEAGUE_MAX_STATES + 1 }, (_, k) => ({
        action: 'C' as const,
        next: { cc: (k + 1) % (LEAGUE_MAX_STATES + 1), cd: 0, dc: 0, dd: 0 },
      })),
    };
    expect(leagueEntryIssues(big).map((i) => i.message)).toEqual([
      `A league entry may have at most ${LEAGUE_MAX_STATES} states (this one has ${LEAGUE_MAX_STATES + 1}).`,
    ]);
  });
});

describe('preview', () => {
  it('shows TFT against STFT alternating out of phase, worth (T + S)/2 per round in the long run', () => {
    // Source: common practice (TFT vs suspicious TFT echo each other's defections); the value is
    // the check matrix's TFT vs STFT = 113.143 at δ = 3/4 (methods.md §4), per round × (1 − δ).
    const p = previewPlay(S('TFT'), S('STFT'), DBF48, 0.75, 6);
    expect(p.own.join('')).toBe('CDCDCD');
    expect(p.partner.join('')).toBe('DCDCDC');
    expect(p.perRound).toBeCloseTo(0.25 * 113.143, 3);
  });
});

describe('the class beside the league', () => {
  // Source: Dal Bó & Fréchette (2011), Table 7, treatment δ = 3/4, R = 48: ALLC 0.0789, Grim 0.1158,
  // TFT 0.5613, T2 0.2439 (ALLD, WSLS 0); β 0.9704 [calc] (methods.md §5).
  const mix = { strategies: ['ALLC', 'Grim', 'TFT', 'T2'], shares: [0.0789, 0.1158, 0.5613, 0.2439], errorProbability: 1 - 0.9704 };
  const entries = ['ALLD', 'TFT', 'WSLS'].map(S);
  const result = classComparison(mix, entries, DBF48, 0.75, 100, S);

  it('values the estimated strategies against each other with the tremble as execution error (ml-matrix)', () => {
    // Source: independent reference, ml-matrix `solve` on the full product chain (methods.md §7).
    mix.strategies.forEach((a, i) =>
      mix.strategies.forEach((b, j) =>
        expectClose(result.perRound[i][j], 0.25 * referenceTotal(S(a), S(b), DBF48, 0.75, mix.errorProbability), 1e-10),
      ),
    );
    const phi = mix.shares.map((x) => x / 0.9999); // the published shares sum to 0.9999 (rounding)
    const f = result.perRound.map((row) => row.reduce((s, v, k) => s + v * phi[k], 0));
    result.earnings.forEach((e, j) => expectClose(e, f[j], 1e-12));
    expectClose(
      result.mean,
      f.reduce((s, x, j) => s + x * phi[j], 0),
      1e-12,
    );
  });

  it('starts the evolution from the class mix', () => {
    result.evolution.shares[0].forEach((x, k) => expectClose(x, mix.shares[k] / mix.shares.reduce((s, v) => s + v, 0), 1e-12));
    expect(result.evolution.shares).toHaveLength(101);
  });

  it('scores each league entry against the class mix', () => {
    // ALLD against the class: (1 − δ)·Σ_k φ_k V(ALLD vs k), each V by ml-matrix.
    const expected = mix.strategies.reduce(
      (s, id, k) => s + (mix.shares[k] / 0.9999) * 0.25 * referenceTotal(S('ALLD'), S(id), DBF48, 0.75, mix.errorProbability),
      0,
    );
    expectClose(result.entriesAgainstMix[0], expected, 1e-10);
  });

  it('gives R to everyone when a nice mix makes no mistakes', () => {
    // Source: common practice: nice strategies (never first to defect) cooperate with each other
    // in every round, so each earns R = 48 per round against any mix of them.
    const nice = classComparison({ ...mix, errorProbability: 0 }, [S('TFT')], DBF48, 0.75, 10, S);
    nice.earnings.forEach((e) => expectClose(e, 48, 1e-12));
    expectClose(nice.entriesAgainstMix[0], 48, 1e-12);
    nice.evolution.shares[10].forEach((x, k) => expectClose(x, mix.shares[k] / mix.shares.reduce((s, v) => s + v, 0), 1e-9));
  });
});
