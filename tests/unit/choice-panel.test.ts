// The one row rule of the choice panel (app/lib/choice-panel.ts) on a tiny constructed session:
// three participants (odd count: one plays a disclosed computer partner each supergame), two
// supergames. Every expected row is written out by hand; then each origin, a half-finished round,
// a hand-over, declined consent, numeric pseudonym order and the estimation's cut.
import { describe, expect, it } from 'vitest';
import {
  comparePseudonyms,
  estimationRows,
  originCounts,
  type PanelRow,
  sessionPanel,
  type StoredChoice,
  type StoredSession,
} from '#app/lib/choice-panel';
import { buildPanel } from '#app/lib/panel';
import { PANEL_COLUMNS } from '#app/lib/panel-codebook';

const choice = (
  supergame: number,
  round: number,
  pairId: string,
  seat: number,
  participantKey: string | null,
  action: 'C' | 'D',
  decisionMs: number,
  atMs: number,
  source: StoredChoice['source'] = participantKey ? 'player' : 'computer',
): StoredChoice => ({
  supergame,
  round,
  pairId,
  seat,
  participantKey,
  action,
  source,
  strategy: source === 'computer' ? 'TFT' : null,
  decisionMs,
  atMs,
});

// Payoffs R=3, S=0, T=5, P=1 (Axelrod 1984, p. 8); δ = 1/2, so draws ≤ 50 continue.
const stored: StoredSession = {
  session: { id: 7, treatment: 'Tiny', payoffs: { R: 3, S: 0, T: 5, P: 1 }, delta: 0.5 },
  participants: [
    { participantKey: '12', pseudonym: 'P-002', consent: null },
    { participantKey: '11', pseudonym: 'P-001', consent: 1 },
    { participantKey: '13', pseudonym: 'P-003', consent: null },
  ],
  draws: [
    { supergame: 1, draws: [30, 80], length: 2 },
    { supergame: 2, draws: [70], length: 1 },
  ],
  choices: [
    choice(1, 1, 'g1-a', 0, '11', 'C', 1100, 1_000),
    choice(1, 1, 'g1-a', 1, '12', 'D', 1200, 1_001),
    choice(1, 1, 'g1-b', 0, '13', 'C', 1300, 1_002),
    choice(1, 1, 'g1-b', 1, null, 'C', 0, 1_003),
    choice(1, 2, 'g1-a', 0, '11', 'D', 2100, 2_000),
    choice(1, 2, 'g1-a', 1, '12', 'D', 15000, 2_001, 'timeout'),
    choice(1, 2, 'g1-b', 0, '13', 'D', 2300, 2_002),
    choice(1, 2, 'g1-b', 1, null, 'C', 0, 2_003),
    choice(2, 1, 'g2-a', 0, '13', 'C', 3100, 3_000),
    choice(2, 1, 'g2-a', 1, '11', 'C', 3200, 3_001),
    choice(2, 1, 'g2-b', 0, '12', 'D', 3300, 3_002),
    choice(2, 1, 'g2-b', 1, null, 'C', 0, 3_003),
  ],
};

const base = { session: 7, treatment: 'Tiny', R: 3, S: 0, T: 5, P: 1, delta: 0.5 } as const;
const at = (ms: number) => new Date(ms).toISOString();

describe('the row rule on a whole session', () => {
  it('gives one row per participant × supergame × round, exactly, in numeric pseudonym order', () => {
    const expected: PanelRow[] = [
      {
        ...base,
        pseudonym: 'P-001',
        partner: 'P-002',
        supergame: 1,
        round: 1,
        action: 'C',
        partner_action: 'D',
        payoff: 0,
        source: 'player',
        partner_source: 'player',
        paid: 1,
        origin: 'own',
        computer_partner: 0,
        decision_ms: 1100,
        draw: 30,
        supergame_length: 2,
        timestamp: at(1_000),
      },
      {
        ...base,
        pseudonym: 'P-001',
        partner: 'P-002',
        supergame: 1,
        round: 2,
        action: 'D',
        partner_action: 'D',
        payoff: 1,
        source: 'player',
        partner_source: 'timeout',
        paid: 1,
        origin: 'own',
        computer_partner: 0,
        decision_ms: 2100,
        draw: 80,
        supergame_length: 2,
        timestamp: at(2_000),
      },
      {
        ...base,
        pseudonym: 'P-001',
        partner: 'P-003',
        supergame: 2,
        round: 1,
        action: 'C',
        partner_action: 'C',
        payoff: 3,
        source: 'player',
        partner_source: 'player',
        paid: 1,
        origin: 'own',
        computer_partner: 0,
        decision_ms: 3200,
        draw: 70,
        supergame_length: 1,
        timestamp: at(3_001),
      },
      {
        ...base,
        pseudonym: 'P-002',
        partner: 'P-001',
        supergame: 1,
        round: 1,
        action: 'D',
        partner_action: 'C',
        payoff: 5,
        source: 'player',
        partner_source: 'player',
        paid: 1,
        origin: 'own',
        computer_partner: 0,
        decision_ms: 1200,
        draw: 30,
        supergame_length: 2,
        timestamp: at(1_001),
      },
      {
        ...base,
        pseudonym: 'P-002',
        partner: 'P-001',
        supergame: 1,
        round: 2,
        action: 'D',
        partner_action: 'D',
        payoff: 1,
        source: 'timeout',
        partner_source: 'player',
        paid: 1,
        origin: 'timeout',
        computer_partner: 0,
        decision_ms: 15000,
        draw: 80,
        supergame_length: 2,
        timestamp: at(2_001),
      },
      {
        ...base,
        pseudonym: 'P-002',
        partner: 'computer:TFT',
        supergame: 2,
        round: 1,
        action: 'D',
        partner_action: 'C',
        payoff: 5,
        source: 'player',
        partner_source: 'computer',
        paid: 1,
        origin: 'own',
        computer_partner: 1,
        decision_ms: 3300,
        draw: 70,
        supergame_length: 1,
        timestamp: at(3_002),
      },
      {
        ...base,
        pseudonym: 'P-003',
        partner: 'computer:TFT',
        supergame: 1,
        round: 1,
        action: 'C',
        partner_action: 'C',
        payoff: 3,
        source: 'player',
        partner_source: 'computer',
        paid: 1,
        origin: 'own',
        computer_partner: 1,
        decision_ms: 1300,
        draw: 30,
        supergame_length: 2,
        timestamp: at(1_002),
      },
      {
        ...base,
        pseudonym: 'P-003',
        partner: 'computer:TFT',
        supergame: 1,
        round: 2,
        action: 'D',
        partner_action: 'C',
        payoff: 5,
        source: 'player',
        partner_source: 'computer',
        paid: 1,
        origin: 'own',
        computer_partner: 1,
        decision_ms: 2300,
        draw: 80,
        supergame_length: 2,
        timestamp: at(2_002),
      },
      {
        ...base,
        pseudonym: 'P-003',
        partner: 'P-001',
        supergame: 2,
        round: 1,
        action: 'C',
        partner_action: 'C',
        payoff: 3,
        source: 'player',
        partner_source: 'player',
        paid: 1,
        origin: 'own',
        computer_partner: 0,
        decision_ms: 3100,
        draw: 70,
        supergame_length: 1,
        timestamp: at(3_000),
      },
    ];
    expect(sessionPanel(stored)).toEqual({ rows: expected, unfinished: [] });
  });

  it('origin: rounds after the end under block termination are kept, unpaid, and say so', () => {
    const block: StoredSession = { ...stored, draws: [{ supergame: 1, draws: [30, 80], length: 1 }, stored.draws[1]] };
    const rows = sessionPanel(block).rows.filter((r) => r.supergame === 1);
    expect(rows.map((r) => [r.pseudonym, r.round, r.paid, r.origin, r.supergame_length])).toEqual([
      ['P-001', 1, 1, 'own', 1],
      ['P-001', 2, 0, 'unpaid_round', 1],
      ['P-002', 1, 1, 'own', 1],
      ['P-002', 2, 0, 'unpaid_round', 1],
      ['P-003', 1, 1, 'own', 1],
      ['P-003', 2, 0, 'unpaid_round', 1],
    ]);
  });

  it('hand-over: the handed seat’s rows are computer_seat; the partner faced computer:<strategy> from then on, and the supergame is flagged', () => {
    // P-002 (key 12) is handed to a computer playing TFT from round 2 of supergame 1
    const handed: StoredSession = {
      ...stored,
      choices: stored.choices.map((c) =>
        c.supergame === 1 && c.round === 2 && c.participantKey === '12' ? { ...c, source: 'computer' as const, strategy: 'TFT' } : c,
      ),
    };
    const rows = sessionPanel(handed).rows.filter((r) => r.supergame === 1 && r.pseudonym !== 'P-003');
    expect(rows.map((r) => [r.pseudonym, r.round, r.partner, r.origin, r.partner_source, r.computer_partner])).toEqual([
      ['P-001', 1, 'P-002', 'own', 'player', 1],
      ['P-001', 2, 'computer:TFT', 'own', 'computer', 1],
      ['P-002', 1, 'P-001', 'own', 'player', 0],
      ['P-002', 2, 'P-001', 'computer_seat', 'player', 0],
    ]);
  });

  it('a half-finished round (one seat chose, the session stopped) is no row and is counted', () => {
    const ended: StoredSession = { ...stored, choices: stored.choices.filter((c) => !(c.pairId === 'g2-a' && c.seat === 1)) };
    const { rows, unfinished } = sessionPanel(ended);
    expect(unfinished).toEqual([{ pseudonym: 'P-003', supergame: 2, round: 1 }]);
    expect(rows).toHaveLength(7);
    expect(rows.some((r) => r.supergame === 2 && (r.pseudonym === 'P-003' || r.pseudonym === 'P-001'))).toBe(false);
  });

  it('participants who declined research consent are left out unless kept for the class’s own view', () => {
    const declined: StoredSession = {
      ...stored,
      participants: stored.participants.map((p) => (p.pseudonym === 'P-002' ? { ...p, consent: 0 } : p)),
    };
    expect(new Set(sessionPanel(declined).rows.map((r) => r.pseudonym))).toEqual(new Set(['P-001', 'P-003']));
    // their partners' rows stay, with the pseudonym they faced
    expect(sessionPanel(declined).rows.filter((r) => r.partner === 'P-002')).toHaveLength(2);
    expect(sessionPanel(declined, { keepDeclined: true }).rows).toHaveLength(9);
  });

  it('missing draws give null, not an error', () => {
    const noDraws: StoredSession = { ...stored, draws: [stored.draws[0]] };
    const r = sessionPanel(noDraws).rows.find((x) => x.supergame === 2)!;
    expect([r.draw, r.supergame_length, r.paid, r.origin]).toEqual([null, null, 1, 'own']);
  });

  it('the rows make a complete panel of app/lib/panel.ts', () => {
    const built = buildPanel(estimationRows(sessionPanel(stored).rows, 'all').rows);
    expect(built.errors).toEqual([]);
    expect(built.warnings).toEqual([]);
    expect(built.panel.subjects.map((s) => [s.subject, s.supergames.map((g) => g.own.join(''))])).toEqual([
      ['P-001', ['CD', 'C']],
      ['P-002', ['DD', 'D']],
      ['P-003', ['CD', 'C']],
    ]);
  });
});

describe('numeric pseudonym order', () => {
  it('P-999 before P-1000, P-101 before P-1000 (a text sort gets both wrong)', () => {
    const names = ['P-1000', 'P-101', 'P-999', 'P-002', 'P-1001', 'P-010'];
    expect([...names].sort(comparePseudonyms)).toEqual(['P-002', 'P-010', 'P-101', 'P-999', 'P-1000', 'P-1001']);
  });

  it('a session of 1,001 participants comes out in that order', () => {
    const n = 1001;
    const participants = Array.from({ length: n }, (_, i) => ({
      participantKey: String(i + 1),
      pseudonym: `P-${String(i + 1).padStart(3, '0')}`,
      consent: null,
    }));
    const choices: StoredChoice[] = participants.map((p, i) => choice(1, 1, `g1-${Math.floor(i / 2)}`, i % 2, p.participantKey, 'C', 1, i));
    choices.push(choice(1, 1, `g1-${Math.floor(n / 2)}`, 1, null, 'D', 0, n));
    const rows = sessionPanel({ ...stored, participants: [...participants].reverse(), choices }).rows;
    expect(rows.map((r) => r.pseudonym)).toEqual(participants.map((p) => p.pseudonym));
    expect(rows.slice(998, 1001).map((r) => r.pseudonym)).toEqual(['P-999', 'P-1000', 'P-1001']);
  });
});

describe('what analyses use', () => {
  it('counts by origin: own paid choices used, the rest left out (or all used on request)', () => {
    const block: StoredSession = { ...stored, draws: [{ supergame: 1, draws: [30, 80], length: 1 }, stored.draws[1]] };
    const { rows } = sessionPanel(block);
    expect(originCounts(rows, 'own')).toEqual({ used: 6, timeout: 0, computer_seat: 0, unpaid_round: 3 });
    expect(originCounts(sessionPanel(stored).rows, 'own')).toEqual({ used: 8, timeout: 1, computer_seat: 0, unpaid_round: 0 });
    expect(originCounts(sessionPanel(stored).rows, 'all')).toEqual({ used: 9, timeout: 0, computer_seat: 0, unpaid_round: 0 });
  });

  it('estimation cuts a supergame at its first left-out choice, so no round is skipped in a history', () => {
    // P-001's round 1 of supergame 1 is timeout-filled: its own round 2 is left out too
    const early: StoredSession = {
      ...stored,
      choices: stored.choices.map((c) =>
        c.supergame === 1 && c.round === 1 && c.participantKey === '11' ? { ...c, source: 'timeout' as const } : c,
      ),
    };
    const used = estimationRows(sessionPanel(early).rows, 'own');
    expect(used.rows.filter((r) => r.subject === 'P-001').map((r) => [r.supergame, r.round])).toEqual([[2, 1]]);
    expect(used.counts).toEqual({ used: 6, timeout: 2, computer_seat: 0, unpaid_round: 0 });
    expect(used.afterLeftOut).toBe(1);
    const built = buildPanel(used.rows, { shorterSupergames: 'expected' });
    expect([built.errors, built.warnings]).toEqual([[], []]);
    expect(estimationRows(sessionPanel(early).rows, 'all').rows).toHaveLength(9);
  });
});

describe('the row and the codebook', () => {
  it('a row has exactly the codebook’s columns, in its order (JSON and the API keep it)', () => {
    expect(Object.keys(sessionPanel(stored).rows[0])).toEqual(PANEL_COLUMNS);
  });
});
