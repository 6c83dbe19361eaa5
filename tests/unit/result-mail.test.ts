// The results e-mail: partners stay anonymous, and after a hand-over the computer's rounds are
// not the participant's (docs/decisions/030).
import { describe, expect, it } from 'vitest';
import type { PanelRow } from '#app/lib/choice-panel';
import { resultMail, summarise } from '#app/models/result-mails.server';

const base: PanelRow = {
  session: 7,
  treatment: 'D75',
  R: 48,
  S: 12,
  T: 50,
  P: 25,
  delta: 0.75,
  pseudonym: 'P-001',
  partner: 'P-002',
  supergame: 1,
  round: 1,
  action: 'C',
  partner_action: 'C',
  payoff: 48,
  source: 'player',
  decision_ms: 900,
  draw: 10,
  supergame_length: 3,
  timestamp: '2026-12-02T10:00:00.000Z',
  paid: 1,
  origin: 'own',
  partner_source: 'player',
  computer_partner: 0,
};
const row = (over: Partial<PanelRow>): PanelRow => ({ ...base, ...over });

describe('results e-mail', () => {
  // P-001 plays rounds 1–2 of supergame 1, is handed to a computer (TFT) for round 3; supergame 2
  // against another participant, then a disclosed computer partner in supergame 3.
  const rows = [
    row({ round: 1, payoff: 48 }),
    row({ round: 2, action: 'D', payoff: 50 }),
    row({ round: 3, source: 'computer', origin: 'computer_seat', payoff: 25 }),
    row({ supergame: 2, partner: 'P-005', round: 1, payoff: 12, supergame_length: 1 }),
    row({
      supergame: 3,
      partner: 'computer:TFT',
      round: 1,
      payoff: 48,
      supergame_length: 1,
      partner_source: 'computer',
      computer_partner: 1,
    }),
  ];

  it('counts only the rounds the participant played: not the computer’s after a hand-over', () => {
    const { supergames, points } = summarise(rows);
    expect(points).toBe(48 + 50 + 12 + 48);
    expect(supergames[0]).toMatchObject({ rounds: 2, points: 98, byComputer: 1 });
  });

  it('never names a partner: another participant, or a disclosed computer partner', () => {
    const mail = resultMail({
      to: 'a@b.test',
      name: null,
      course: 'Course',
      session: { id: 7, treatment: 'D75', simulated: false, credit: { kind: 'participation', credit: 1 } } as Parameters<
        typeof resultMail
      >[0]['session'],
      pseudonym: 'P-001',
      rows,
    });
    for (const text of [mail.text, mail.html]) {
      expect(text).not.toContain('P-002');
      expect(text).not.toContain('P-005');
      expect(text).toContain('another participant');
      expect(text).toContain('a computer partner (TFT)');
      expect(text).toContain('a computer played 1 round in your seat; they earn you no points');
    }
    expect(mail.text).toContain('Points: 158');
  });
});
