import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { type CsvColumn, csvLines, neutraliseCell } from '#app/lib/csv';

// Source: OWASP, "CSV Injection" — cells beginning with = + - @ TAB (0x09) or CR (0x0D) are
// prefixed with a single quote.
const FORMULAS = [
  '=HYPERLINK("http://evil.example","x")',
  '+1+1',
  "-2+3+cmd|' /C calc'!A0",
  '@SUM(1,1)',
  '\t=1+1',
  '\r=1+1',
  '=1+1\nsecond line',
  '=1+1\r\nsecond line',
];

const columns: CsvColumn[] = [
  { key: 'treatment', type: 'text' },
  { key: 'payoff', type: 'number' },
  { key: 'payout', type: 'number' },
];

const parse = (csv: string) => Papa.parse<string[]>(csv, { skipEmptyLines: true }).data;

describe('neutraliseCell', () => {
  it('prefixes every formula start with a single quote and leaves other text alone', () => {
    for (const f of FORMULAS) expect(neutraliseCell(f)).toBe(`'${f}`);
    for (const plain of ['Control', 'P-001', 'computer:TFT', '2027-03-03T10:21:07.412Z', '', ' =1', "'=1", 'a=b'])
      expect(neutraliseCell(plain)).toBe(plain);
  });
});

describe('csvLines', () => {
  it('writes text cells neutralised, and reads back to the prefixed text', () => {
    const csv = csvLines(
      FORMULAS.map((treatment) => ({ treatment, payoff: 1, payout: '2.50' })),
      columns,
    );
    const rows = parse(csv);
    expect(rows[0]).toEqual(['treatment', 'payoff', 'payout']);
    expect(rows.slice(1).map((r) => r[0])).toEqual(FORMULAS.map((f) => `'${f}`));
    // no physical line of the file begins a formula either
    for (const line of csv.split(/\r?\n/)) expect(line).not.toMatch(/^[=+\-@\t\r]/);
  });

  it('keeps number columns numbers, negative ones included (decided by the column, not the value)', () => {
    const csv = csvLines(
      [
        { treatment: '-1', payoff: -1, payout: '-0.50' },
        { treatment: 'x', payoff: -12.5, payout: 3 },
      ],
      columns,
    );
    expect(csv).toBe("treatment,payoff,payout\n'-1,-1,-0.50\nx,-12.5,3\n");
  });

  it('treats a non-number handed to a number column as text, so it cannot slip through', () => {
    expect(csvLines([{ treatment: 'a', payoff: '=1+1', payout: '+5' }], columns)).toBe("treatment,payoff,payout\na,'=1+1,'+5\n");
  });

  it('writes null and undefined as empty cells, NaN in a number column too', () => {
    expect(csvLines([{ treatment: null, payoff: Number.NaN }], columns)).toBe('treatment,payoff,payout\n,,\n');
  });

  it('quotes what needs quoting (commas, quotes, line breaks)', () => {
    const csv = csvLines([{ treatment: 'a, "b"\nc', payoff: 1, payout: 1 }], columns);
    expect(csv).toBe('treatment,payoff,payout\n"a, ""b""\nc",1,1\n');
    expect(parse(csv)[1]).toEqual(['a, "b"\nc', '1', '1']);
  });

  it('writes the header alone for no rows, and nothing without a header (streamed pages)', () => {
    expect(csvLines([], columns)).toBe('treatment,payoff,payout\n');
    expect(csvLines([], columns, { header: false })).toBe('');
    expect(csvLines([{ treatment: '@x', payoff: 2, payout: 1 }], columns, { header: false })).toBe("'@x,2,1\n");
  });
});
