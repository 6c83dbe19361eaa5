import { describe, expect, it } from 'vitest';
import type { Action } from '#app/lib/automata';
import { buildPanel, countChoices, groupPanel, parseWindow, selectWindow, windowSupergames } from '#app/lib/panel';
import type { ChoiceRow } from '#app/lib/panel';

/** Rows of one pair playing `lengths[g]` rounds in supergame g + 1 of a session, all cooperating. */
function pairRows(session: string, treatment: string, a: string, b: string, lengths: number[]): ChoiceRow[] {
  const rows: ChoiceRow[] = [];
  lengths.forEach((L, g) => {
    for (let r = 1; r <= L; r++) {
      const base = { session, treatment, supergame: g + 1, round: r, action: 'C' as Action, partnerAction: 'C' as Action };
      rows.push({ ...base, subject: a, partner: b }, { ...base, subject: b, partner: a });
    }
  });
  return rows.map((r, i) => ({ ...r, line: i + 2 }));
}

describe('buildPanel', () => {
  it('groups rows into subjects → supergames → rounds in order, whatever the row order', () => {
    const rows = pairRows('S1', 'T', 'P-1', 'P-2', [2, 3]).reverse();
    rows.push({ session: 'S1', treatment: 'T', subject: 'P-3', partner: 'P-4', supergame: 1, round: 2, action: 'D', partnerAction: 'C' });
    rows.push({ session: 'S1', treatment: 'T', subject: 'P-3', partner: 'P-4', supergame: 1, round: 1, action: 'C', partnerAction: 'D' });
    const { panel, errors } = buildPanel(rows);
    expect(errors).toEqual([]);
    expect(panel.subjects.map((s) => s.subject)).toEqual(['P-1', 'P-2', 'P-3']);
    expect(panel.subjects[0].supergames.map((g) => g.own.length)).toEqual([2, 3]);
    expect(panel.subjects[2].supergames[0]).toEqual({ supergame: 1, own: ['C', 'D'], partner: ['D', 'C'] });
    // supergame length = max round of the session-supergame; start = rounds played before it
    expect(panel.supergames).toEqual([
      { session: 'S1', treatment: 'T', supergame: 1, length: 2, start: 0 },
      { session: 'S1', treatment: 'T', supergame: 2, length: 3, start: 2 },
    ]);
    expect(countChoices(panel)).toBe(2 * 5 + 2);
  });

  it('reports a missing round, a duplicate and a second treatment with their lines', () => {
    const rows = pairRows('S1', 'T', 'P-1', 'P-2', [3]);
    const gap = rows.filter((r) => !(r.subject === 'P-1' && r.round === 2));
    gap.push({ ...gap[0], line: 99 });
    gap.push({ ...gap[0], treatment: 'U', subject: 'P-9', line: 100 });
    const { errors } = buildPanel(gap);
    expect(errors).toEqual([
      { line: 99, message: expect.stringContaining('duplicate row for session S1, subject P-1, supergame 1, round 1 (first at line 2)') },
      { line: 100, message: expect.stringContaining('treatment "U"') },
      { line: 6, message: expect.stringContaining('round 2 is missing') },
    ]);
  });

  it('warns when a subject stops before the others or a session skips a supergame number', () => {
    const rows = pairRows('S1', 'T', 'P-1', 'P-2', [3, 2, 2]).filter(
      (r) => r.supergame !== 2 && !(r.subject === 'P-2' && r.supergame === 1 && r.round === 3),
    );
    const { errors, warnings } = buildPanel(rows);
    expect(errors).toEqual([]);
    expect(warnings.map((w) => w.message)).toEqual([
      expect.stringContaining('subject P-2, supergame 1: 2 rounds, but the supergame lasted 3'),
      expect.stringContaining('no rows for supergame(s) 2..2'),
    ]);
  });
});

describe('windows', () => {
  // Lengths 4, 3, 5, 2, 6 → starts 0, 4, 7, 12, 14.
  const two = [...pairRows('S1', 'A', 'P-1', 'P-2', [4, 3, 5, 2, 6]), ...pairRows('S2', 'B', 'P-1', 'P-2', [1, 1])];
  const { panel } = buildPanel(two);
  const numbers = (w: string, session = 'S1') =>
    windowSupergames(panel, parseWindow(w))
      .filter((g) => g.session === session)
      .map((g) => g.supergame);

  it('after-rounds:R keeps supergames whose start (rounds already played) is ≥ R', () => {
    // Dal Bó & Fréchette (2011): supergames that start after 110 rounds; "≥" is the reading that
    // reproduces their counts (tests/unit/dbf2011.test.ts).
    expect(numbers('after-rounds:7')).toEqual([3, 4, 5]);
    expect(numbers('after-rounds:8')).toEqual([4, 5]);
    expect(numbers('after-rounds:0')).toEqual([1, 2, 3, 4, 5]);
    expect(numbers('after-rounds:7', 'S2')).toEqual([]);
  });

  it('last:n keeps the last n supergames of each session; supergames:a-b a range', () => {
    expect(numbers('last:2')).toEqual([4, 5]);
    expect(numbers('last:2', 'S2')).toEqual([1, 2]);
    expect(numbers('supergames:2-3')).toEqual([2, 3]);
    expect(numbers('all', 'S2')).toEqual([1, 2]);
  });

  it('selectWindow drops subjects left with nothing; groupPanel splits by treatment', () => {
    const late = selectWindow(panel, parseWindow('after-rounds:7'));
    expect(late.subjects.map((s) => `${s.session}/${s.subject}`)).toEqual(['S1/P-1', 'S1/P-2']);
    expect(late.subjects[0].supergames.map((g) => g.supergame)).toEqual([3, 4, 5]);
    expect(groupPanel(panel, 'treatment').map((g) => [g.group, g.panel.subjects.length])).toEqual([
      ['A', 2],
      ['B', 2],
    ]);
    expect(groupPanel(panel, 'none')[0].panel).toBe(panel);
  });

  it('parseWindow rejects what it does not know', () => {
    expect(parseWindow('supergames:5-20')).toEqual({ kind: 'supergames', from: 5, to: 20 });
    expect(() => parseWindow('last:0')).toThrow(/Unknown window/);
    expect(() => parseWindow('supergames:9-3')).toThrow(/Unknown window/);
    expect(() => parseWindow('first:3')).toThrow(/Unknown window/);
  });
});
