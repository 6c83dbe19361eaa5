import { describe, expect, it } from 'vitest';
import { deltaWarning, NEW_LEAGUE, readDeadline, readLeagueForm } from '#app/utils/league-form';

const form = (fields: Record<string, string>) => new Map(Object.entries(fields));
const valid = {
  title: 'Week 5 league',
  'payoffs.R': '3',
  'payoffs.S': '0',
  'payoffs.T': '5',
  'payoffs.P': '1',
  delta: '0.9',
  epsilon: '0',
  matches: '0',
  generations: '100',
  seed: '1',
  deadline: '',
  tz: '0',
};

describe('the new-league form', () => {
  it('reads a valid form into a design', () => {
    const r = readLeagueForm(form(valid));
    expect(r).toEqual({ ok: true, title: 'Week 5 league', design: NEW_LEAGUE, deadline: null });
  });

  it('puts each problem beside its field and saves nothing', () => {
    const r = readLeagueForm(form({ ...valid, title: '', 'payoffs.R': '0.5', delta: '1', matches: '1', generations: '2.5', epsilon: 'x' }));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(Object.keys(r.errors).sort()).toEqual(['delta', 'epsilon', 'generations', 'matches', 'payoffs.R', 'title']);
    // Source: common practice (a prisoner's dilemma needs T > R > P > S; Axelrod 1984, p. 8)
    expect(r.errors['payoffs.R']).toMatch(/R \(reward\) must be greater than P/);
    expect(r.errors.matches).toMatch(/at least 2/);
  });

  it('reads the deadline in the browser’s time zone, and refuses one in the past', () => {
    const now = new Date('2026-12-02T12:00:00Z');
    // getTimezoneOffset is −60 in Central European Time: 18:00 there is 17:00 UTC
    expect(readDeadline(form({ deadline: '2026-12-03T18:00', tz: '-60' }), now)).toEqual({
      ok: true,
      deadline: new Date('2026-12-03T17:00:00Z'),
    });
    expect(readDeadline(form({ deadline: '2026-12-01T18:00', tz: '0' }), now)).toEqual({
      ok: false,
      message: 'The deadline must be in the future.',
    });
    expect(readDeadline(form({ deadline: 'tomorrow', tz: '0' }), now)).toMatchObject({ ok: false });
    expect(readDeadline(form({ deadline: '2026-12-03T18:00', tz: '99999' }), now)).toMatchObject({ ok: false });
    expect(readDeadline(form({ deadline: '' }), now)).toEqual({ ok: true, deadline: null });
  });
});

describe('the δ warning', () => {
  it('warns below (T − R)/(T − P), the least δ at which grim trigger sustains cooperation, and not at or above it', () => {
    // Source: Friedman (1971) [mem], grim trigger is an equilibrium iff δ ≥ (T − R)/(T − P);
    // at Axelrod's payoffs (1984, p. 8: T 5, R 3, P 1, S 0) that is 2/4 = 0.5 [calc].
    const p = { R: 3, S: 0, T: 5, P: 1 };
    expect(deltaWarning({ payoffs: p, delta: 0.49 })).toMatch(/needs δ ≥ \(T − R\)\/\(T − P\) = 0\.500/);
    expect(deltaWarning({ payoffs: p, delta: 0.5 })).toBeNull();
    expect(deltaWarning({ payoffs: p, delta: 0.9 })).toBeNull();
    // not a prisoner's dilemma: the field errors speak, not the warning
    expect(deltaWarning({ payoffs: { R: 1, S: 0, T: 5, P: 3 }, delta: 0.1 })).toBeNull();
  });
});
