// The Debrief's numbers (app/lib/debrief.ts) on a hand-counted three-person session.
import { describe, expect, it } from 'vitest';
import { lengthFit, originWords, pointsHistogram, sessionDebrief, type DebriefRow } from '#app/lib/debrief';

const row = (
  pseudonym: string,
  supergame: number,
  round: number,
  action: 'C' | 'D',
  partnerAction: 'C' | 'D',
  payoff: number,
  length: number,
  origin: DebriefRow['origin'] = 'own',
): DebriefRow => ({
  pseudonym,
  supergame,
  round,
  action,
  partner_action: partnerAction,
  payoff,
  paid: round <= length ? 1 : 0,
  origin: round <= length ? origin : 'unpaid_round',
  computer_partner: 0,
  supergame_length: length,
});
// Axelrod's payoffs T=5, R=3, P=1, S=0 (Axelrod 1984, p. 8).
const rows: DebriefRow[] = [
  row('P-001', 1, 1, 'C', 'D', 0, 2),
  row('P-001', 1, 2, 'D', 'D', 1, 2),
  row('P-001', 2, 1, 'C', 'C', 3, 1),
  row('P-002', 1, 1, 'D', 'C', 5, 2),
  row('P-002', 1, 2, 'D', 'D', 1, 2, 'timeout'),
  row('P-002', 2, 1, 'D', 'C', 5, 1),
  row('P-003', 1, 1, 'C', 'C', 3, 2),
  row('P-003', 1, 2, 'D', 'C', 5, 2),
  row('P-003', 2, 1, 'C', 'C', 3, 1),
];
const design = { payoffs: { R: 3, S: 0, T: 5, P: 1 }, delta: 0.5 };

describe('sessionDebrief', () => {
  const d = sessionDebrief(rows, design, 'all');

  it('own, paid choices by default: the timeout-filled choice is left out and counted', () => {
    const own = sessionDebrief(rows, design);
    expect([own.include, own.counts]).toEqual(['own', { used: 8, timeout: 1, computer_seat: 0, unpaid_round: 0 }]);
    expect([own.overall.cooperate, own.overall.n]).toEqual([4, 8]);
    expect(own.bySupergame[0].all).toEqual({ n: 5, cooperate: 2, rate: 2 / 5 });
    expect(originWords({ debrief: own, unfinished: 1 })).toBe(
      'Own choices in rounds that count: 8. Left out: 1 filled by the timeout rule. 1 half-finished round (only one of the pair had chosen) left out.',
    );
    // points are what each participant is credited, whoever chose
    expect(own.points).toEqual(d.points);
  });

  it('under block termination the rounds after the end count neither in cooperation nor in “supergames that reached this round”', () => {
    // supergame 2 really ended after round 1, but its block of 2 rounds was played
    const block = [...rows, row('P-001', 2, 2, 'D', 'C', 5, 1), row('P-003', 2, 2, 'C', 'D', 0, 1)];
    const own = sessionDebrief(block, design);
    expect(own.byRound.map((r) => [r.round, r.supergames, r.all.n])).toEqual([
      [1, 2, 6],
      [2, 1, 2],
    ]);
    expect(own.counts.unpaid_round).toBe(2);
    expect(sessionDebrief(block, design, 'all').byRound[1].supergames).toBe(2);
    expect(own.points.find((p) => p.subject === 'P-001')!.points).toBe(4);
  });

  it('cooperation by supergame, all rounds and round 1 (every origin, by the switch)', () => {
    expect(d.bySupergame.map((g) => [g.supergame, g.length, g.all.cooperate, g.all.n, g.round1.cooperate, g.round1.n])).toEqual([
      [1, 2, 2, 6, 2, 3],
      [2, 1, 2, 3, 2, 3],
    ]);
    expect([d.overall.cooperate, d.overall.n, d.overallRound1.cooperate, d.overallRound1.n]).toEqual([4, 9, 4, 6]);
  });

  it('cooperation by round within the supergame', () => {
    expect(d.byRound.map((r) => [r.round, r.supergames, r.all.cooperate, r.all.n])).toEqual([
      [1, 2, 4, 6],
      [2, 1, 0, 3],
    ]);
  });

  it('outcome shares of participant-rounds', () => {
    expect(d.bySupergame[0].outcomes).toEqual({ both: 1 / 6, one: 3 / 6, none: 2 / 6, n: 6 });
    expect(d.bySupergame[1].outcomes).toEqual({ both: 2 / 3, one: 1 / 3, none: 0, n: 3 });
  });

  it('points are the paid payoffs of each participant', () => {
    expect(d.points).toEqual([
      { subject: 'P-001', points: 4 },
      { subject: 'P-002', points: 11 },
      { subject: 'P-003', points: 11 },
    ]);
    expect(pointsHistogram([4, 11, 11]).map((b) => b.count)).toEqual([1, 0, 0, 0, 0, 0, 0, 2]);
  });

  it('rows a computer played for a participant do not count as the participant’s cooperation', () => {
    const handed = rows.map((r) =>
      r.pseudonym === 'P-003' && r.supergame === 1 && r.round === 2 ? { ...r, origin: 'computer_seat' as const, action: 'C' as const } : r,
    );
    const h = sessionDebrief(handed, design);
    expect([h.overall.cooperate, h.overall.n, h.counts.computer_seat]).toEqual([4, 7, 1]);
  });

  it('thresholds at δ = 1/2: δ_SPE 1/2, δ_RD 3/5, sizeBAD 1', () => {
    // Source: methods.md §1 check values for Axelrod's payoffs [calc].
    expect(d.theory.grimSPE).toBeCloseTo(0.5, 12);
    expect(d.theory.riskDominance).toBeCloseTo(0.6, 12);
    expect(d.theory.sizeBAD).toBe(1);
  });

  it('two supergames are too few for the χ² distribution: the p-value is simulated instead', () => {
    if (!d.lengths.test.ok) throw new Error(d.lengths.test.message);
    expect(d.lengths.test.result.method).toBe('simulated');
    // n = 2, δ = 1/2: bins 1 and 2+ expect 1 each [calc]; lengths 1 and 2 fit them exactly, χ² = 0, p = 1
    expect(d.lengths.test.result.bins.map((b) => [b.from, b.to, b.observed, b.expected])).toEqual([
      [1, 1, 1, 1],
      [2, null, 1, 1],
    ]);
    expect(d.lengths.test.result.statistic).toBe(0);
    expect(d.lengths.test.result.pValue).toBe(1);
    expect(d.lengths.histogram).toEqual([
      { k: 1, observed: 1, expected: 1 },
      { k: 2, observed: 1, expected: 0.5 },
    ]);
  });

  it('forty supergames at δ = 1/2: bins 1, 2, 3+ with expected 20, 10, 10', () => {
    // Source: methods.md §2, P(L = k) = (1−δ)δ^(k−1); pooling to expected counts ≥ 5 [calc].
    const lengths = [...Array(18).fill(1), ...Array(12).fill(2), ...Array(10).fill(3)].map((length, i) => ({ supergame: i + 1, length }));
    const fit = lengthFit(lengths, 0.5);
    if (!fit.test.ok) throw new Error(fit.test.message);
    expect(fit.test.result.bins.map((b) => [b.from, b.to, b.observed, b.expected])).toEqual([
      [1, 1, 18, 20],
      [2, 2, 12, 10],
      [3, null, 10, 10],
    ]);
    // (18−20)²/20 + (12−10)²/10 + 0 = 0.2 + 0.4
    expect(fit.test.result.statistic).toBeCloseTo(0.6, 12);
    expect(fit.test.result.df).toBe(2);
  });
});
