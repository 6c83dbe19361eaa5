// The session → choice-panel conversion (app/models/panel.server.ts) on a tiny constructed
// session: three participants (odd count: one plays a disclosed computer partner each supergame),
// two supergames. Every expected row is written out by hand.
import { describe, expect, it } from 'vitest';
import { buildPanel } from '#app/lib/panel';
import { estimationRows, sessionPanelRows, type SessionPanelRow, type StoredSessionRows } from '#app/models/panel.server';

// Payoffs R=3, S=0, T=5, P=1 (Axelrod 1984, p. 8); δ = 1/2, so draws ≤ 50 continue.
const stored: StoredSessionRows = {
  session: { id: 7, treatment: 'Tiny', design: { payoffs: { R: 3, S: 0, T: 5, P: 1 } } },
  participants: [
    { participantKey: '12', pseudonym: 'P-002' },
    { participantKey: '11', pseudonym: 'P-001' },
    { participantKey: '13', pseudonym: 'P-003' },
  ],
  draws: [
    { supergame: 1, draws: [30, 80], length: 2 },
    { supergame: 2, draws: [70], length: 1 },
  ],
  pairs: [
    { supergame: 1, pairId: 'g1-a', seat0: '11', seat1: '12', computerStrategy: null },
    { supergame: 1, pairId: 'g1-b', seat0: '13', seat1: null, computerStrategy: 'TFT' },
    { supergame: 2, pairId: 'g2-a', seat0: '13', seat1: '11', computerStrategy: null },
    { supergame: 2, pairId: 'g2-b', seat0: '12', seat1: null, computerStrategy: 'TFT' },
  ],
  choices: [
    { supergame: 1, round: 1, pairId: 'g1-a', seat: 0, participantKey: '11', action: 'C', source: 'player', strategy: null, decisionMs: 1100, atMs: 1_000 },
    { supergame: 1, round: 1, pairId: 'g1-a', seat: 1, participantKey: '12', action: 'D', source: 'player', strategy: null, decisionMs: 1200, atMs: 1_001 },
    { supergame: 1, round: 1, pairId: 'g1-b', seat: 0, participantKey: '13', action: 'C', source: 'player', strategy: null, decisionMs: 1300, atMs: 1_002 },
    { supergame: 1, round: 1, pairId: 'g1-b', seat: 1, participantKey: null, action: 'C', source: 'computer', strategy: 'TFT', decisionMs: 0, atMs: 1_003 },
    { supergame: 1, round: 2, pairId: 'g1-a', seat: 0, participantKey: '11', action: 'D', source: 'player', strategy: null, decisionMs: 2100, atMs: 2_000 },
    { supergame: 1, round: 2, pairId: 'g1-a', seat: 1, participantKey: '12', action: 'D', source: 'timeout', strategy: null, decisionMs: 15000, atMs: 2_001 },
    { supergame: 1, round: 2, pairId: 'g1-b', seat: 0, participantKey: '13', action: 'D', source: 'player', strategy: null, decisionMs: 2300, atMs: 2_002 },
    { supergame: 1, round: 2, pairId: 'g1-b', seat: 1, participantKey: null, action: 'C', source: 'computer', strategy: 'TFT', decisionMs: 0, atMs: 2_003 },
    { supergame: 2, round: 1, pairId: 'g2-a', seat: 0, participantKey: '13', action: 'C', source: 'player', strategy: null, decisionMs: 3100, atMs: 3_000 },
    { supergame: 2, round: 1, pairId: 'g2-a', seat: 1, participantKey: '11', action: 'C', source: 'player', strategy: null, decisionMs: 3200, atMs: 3_001 },
    { supergame: 2, round: 1, pairId: 'g2-b', seat: 0, participantKey: '12', action: 'D', source: 'player', strategy: null, decisionMs: 3300, atMs: 3_002 },
    { supergame: 2, round: 1, pairId: 'g2-b', seat: 1, participantKey: null, action: 'C', source: 'computer', strategy: 'TFT', decisionMs: 0, atMs: 3_003 },
  ],
};

const base = { session: '7', treatment: 'Tiny' } as const;

describe('sessionPanelRows', () => {
  it('gives one row per participant × supergame × round, exactly', () => {
    const expected: SessionPanelRow[] = [
      { ...base, subject: 'P-001', partner: 'P-002', supergame: 1, round: 1, action: 'C', partnerAction: 'D', payoff: 0, paid: true, source: 'player', partnerSource: 'player', draw: 30, supergameLength: 2, decisionMs: 1100, atMs: 1_000 },
      { ...base, subject: 'P-001', partner: 'P-002', supergame: 1, round: 2, action: 'D', partnerAction: 'D', payoff: 1, paid: true, source: 'player', partnerSource: 'timeout', draw: 80, supergameLength: 2, decisionMs: 2100, atMs: 2_000 },
      { ...base, subject: 'P-001', partner: 'P-003', supergame: 2, round: 1, action: 'C', partnerAction: 'C', payoff: 3, paid: true, source: 'player', partnerSource: 'player', draw: 70, supergameLength: 1, decisionMs: 3200, atMs: 3_001 },
      { ...base, subject: 'P-002', partner: 'P-001', supergame: 1, round: 1, action: 'D', partnerAction: 'C', payoff: 5, paid: true, source: 'player', partnerSource: 'player', draw: 30, supergameLength: 2, decisionMs: 1200, atMs: 1_001 },
      { ...base, subject: 'P-002', partner: 'P-001', supergame: 1, round: 2, action: 'D', partnerAction: 'D', payoff: 1, paid: true, source: 'timeout', partnerSource: 'player', draw: 80, supergameLength: 2, decisionMs: 15000, atMs: 2_001 },
      { ...base, subject: 'P-002', partner: 'computer:TFT', supergame: 2, round: 1, action: 'D', partnerAction: 'C', payoff: 5, paid: true, source: 'player', partnerSource: 'computer', draw: 70, supergameLength: 1, decisionMs: 3300, atMs: 3_002 },
      { ...base, subject: 'P-003', partner: 'computer:TFT', supergame: 1, round: 1, action: 'C', partnerAction: 'C', payoff: 3, paid: true, source: 'player', partnerSource: 'computer', draw: 30, supergameLength: 2, decisionMs: 1300, atMs: 1_002 },
      { ...base, subject: 'P-003', partner: 'computer:TFT', supergame: 1, round: 2, action: 'D', partnerAction: 'C', payoff: 5, paid: true, source: 'player', partnerSource: 'computer', draw: 80, supergameLength: 2, decisionMs: 2300, atMs: 2_002 },
      { ...base, subject: 'P-003', partner: 'P-001', supergame: 2, round: 1, action: 'C', partnerAction: 'C', payoff: 3, paid: true, source: 'player', partnerSource: 'player', draw: 70, supergameLength: 1, decisionMs: 3100, atMs: 3_000 },
    ];
    expect(sessionPanelRows(stored)).toEqual(expected);
  });

  it('the rows make a complete panel of app/lib/panel.ts', () => {
    const built = buildPanel(sessionPanelRows(stored));
    expect(built.errors).toEqual([]);
    expect(built.warnings).toEqual([]);
    expect(built.panel.subjects.map((s) => [s.subject, s.supergames.map((g) => g.own.join(''))])).toEqual([
      ['P-001', ['CD', 'C']],
      ['P-002', ['DD', 'D']],
      ['P-003', ['CD', 'C']],
    ]);
    expect(built.panel.supergames.map((g) => [g.supergame, g.length, g.start])).toEqual([
      [1, 2, 0],
      [2, 1, 2],
    ]);
  });

  it('rounds after the end under block termination are kept but unpaid', () => {
    const block: StoredSessionRows = { ...stored, draws: [{ supergame: 1, draws: [30, 80], length: 1 }, stored.draws[1]] };
    const rows = sessionPanelRows(block).filter((r) => r.supergame === 1);
    expect(rows.map((r) => [r.subject, r.round, r.paid, r.supergameLength])).toEqual([
      ['P-001', 1, true, 1],
      ['P-001', 2, false, 1],
      ['P-002', 1, true, 1],
      ['P-002', 2, false, 1],
      ['P-003', 1, true, 1],
      ['P-003', 2, false, 1],
    ]);
  });

  it('estimation leaves out rows a computer played in a participant’s seat (hand-over)', () => {
    const handed: StoredSessionRows = {
      ...stored,
      choices: stored.choices.map((c) => (c.supergame === 1 && c.round === 2 && c.participantKey === '13' ? { ...c, source: 'computer' as const, strategy: 'TFT' } : c)),
    };
    const rows = estimationRows(sessionPanelRows(handed));
    expect(rows).toHaveLength(8);
    expect(rows.some((r) => r.subject === 'P-003' && r.supergame === 1 && r.round === 2)).toBe(false);
  });

  it('refuses a seat whose partner has no choice in that round', () => {
    const broken: StoredSessionRows = { ...stored, choices: stored.choices.filter((c) => !(c.pairId === 'g2-a' && c.seat === 1)) };
    expect(() => sessionPanelRows(broken)).toThrow('no partner choice for P-003 (supergame 2, round 1, pair g2-a)');
  });
});
