import { describe, expect, it } from 'vitest';
import { estimateFromCsv, parseChoiceCsv, parseColumnMap, parseStrategyList, readChoiceCsv } from '#app/lib/panel-csv';

const HEADER = 'session,treatment,delta,supergame,round,pseudonym,partner,action,partner_action,payoff';

describe('parseChoiceCsv', () => {
  it("reads Parley's export columns and ignores the others", () => {
    const csv = `${HEADER}\nS1,D75R48,0.75,1,1,P-001,P-002,C,D,12\nS1,D75R48,0.75,1,1,P-002,P-001,d,c,50\n`;
    const { rows, errors } = parseChoiceCsv(csv);
    expect(errors).toEqual([]);
    expect(rows).toEqual([
      {
        session: 'S1',
        treatment: 'D75R48',
        subject: 'P-001',
        partner: 'P-002',
        supergame: 1,
        round: 1,
        action: 'C',
        partnerAction: 'D',
        line: 2,
      },
      {
        session: 'S1',
        treatment: 'D75R48',
        subject: 'P-002',
        partner: 'P-001',
        supergame: 1,
        round: 1,
        action: 'D',
        partnerAction: 'C',
        line: 3,
      },
    ]);
  });

  it('maps other column names; 1/0 mean cooperate/defect; a BOM and blank lines are fine', () => {
    const csv = '\uFEFFsession,treatment,supergame,round,subject,partner,cooperate,partner_cooperate\n\nS01,D5R32,1,1,S01-01,S01-07,0,1\n';
    const map = parseColumnMap(['subject=subject', 'action=cooperate', 'partner_action=partner_cooperate']);
    const { rows, errors } = parseChoiceCsv(csv, map);
    expect(errors).toEqual([]);
    expect(rows[0]).toMatchObject({ subject: 'S01-01', action: 'D', partnerAction: 'C', line: 3 });
  });

  it('reports every bad row with its line and column (line numbers survive quoted line breaks)', () => {
    const csv = [
      HEADER,
      'S1,T,0.75,1,1,P-1,P-2,C,C,0',
      'S1,"T\nwith a break",0.75,1,1,P-2,P-1,C,C,0',
      'S1,T,0.75,x,1,P-3,P-4,maybe,C,0',
      ',T,0.75,1,0,P-4,P-3,C,C,0',
    ].join('\n');
    const { errors } = parseChoiceCsv(csv);
    expect(errors).toEqual([
      { line: 5, message: 'supergame: must be a whole number ≥ 1 (got "x")' },
      { line: 5, message: 'action: must be C or D (or 1 = cooperate, 0 = defect) (got "maybe")' },
      { line: 6, message: 'session: must not be empty (got "")' },
      { line: 6, message: 'round: must be a whole number ≥ 1 (got "0")' },
    ]);
  });

  it('names a missing column and how to map it', () => {
    const { errors } = parseChoiceCsv('session,treatment,supergame,round,subject,partner,action,partner_action\n');
    expect(errors).toEqual([{ line: 1, message: 'column "pseudonym" (subject) not found; map another with subject=<column>' }]);
    expect(parseChoiceCsv('').errors).toEqual([{ line: null, message: 'the file is empty' }]);
    expect(() => parseColumnMap(['colour=red'])).toThrow(/Bad column mapping/);
  });
});

describe('readChoiceCsv and estimateFromCsv', () => {
  it('is all-or-nothing: one bad line, no panel and no estimate', () => {
    const csv = `${HEADER}\nS1,T,0.75,1,1,P-1,P-2,C,C,0\nS1,T,0.75,1,1,P-2,P-1,C,C,0\nS1,T,0.75,1,3,P-1,P-2,C,C,0\n`;
    const built = readChoiceCsv(csv);
    expect(built.panel.subjects).toEqual([]);
    expect(built.errors).toEqual([{ line: 4, message: expect.stringContaining('round 2 is missing') }]);
    const run = estimateFromCsv(csv);
    expect(run.groups).toEqual([]);
    expect(run.errors).toHaveLength(1);
  });

  it('estimates a clean file per treatment', () => {
    const lines = [HEADER];
    for (const [s, t] of [
      ['S1', 'A'],
      ['S2', 'B'],
    ])
      for (let r = 1; r <= 3; r++) lines.push(`${s},${t},0.75,1,${r},P-1,P-2,D,D,25`, `${s},${t},0.75,1,${r},P-2,P-1,D,D,25`);
    const run = estimateFromCsv(lines.join('\n'), { strategies: 'ALLD,ALLC', window: 'all' });
    expect(run.errors).toEqual([]);
    expect(run.groups.map((g) => [g.group, g.estimate.subjects, g.estimate.choices])).toEqual([
      ['A', 2, 6],
      ['B', 2, 6],
    ]);
    // everyone always defects: all weight on ALLD (no mismatch with it at all)
    expect(run.groups[0].estimate.shares[0]).toBeCloseTo(1, 10);
  });

  it('parseStrategyList takes library ids in the given order', () => {
    expect(parseStrategyList('TFT, ALLD').map((a) => a.id)).toEqual(['TFT', 'ALLD']);
    expect(() => parseStrategyList('TFT,Nope')).toThrow(/Unknown strategy "Nope"/);
    expect(() => parseStrategyList('TFT,TFT')).toThrow(/twice/);
  });
});
