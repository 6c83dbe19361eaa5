/**
 * The one CSV writer: every CSV Parley hands out (panel downloads, zip and API, the codebook, the
 * credit sheet, the Debrief's chart data) goes through `csvLines`, so the rule against formula
 * injection lives here and nowhere else. Pure.
 *
 * The rule (OWASP, "CSV Injection"): a spreadsheet reads a cell that begins with = + - @, a tab
 * or a carriage return as a formula (`=HYPERLINK(…)` comes back as a live link), so such a text
 * cell is written with a single quote in front. Which cells are text is decided by the column's
 * declared type, never by the value, so a negative payoff (-1) in a number column stays -1.
 *
 * papaparse still does the quoting. Its own `escapeFormulae: true` is not used: its test
 * (`/^[=+\-@\t\r].*$/`, no `s` flag) lets a multi-line cell such as "=1+1\nx" through, and it
 * decides by the JavaScript type of each value, not by the column.
 */
import Papa from 'papaparse';

export type CsvColumnType = 'text' | 'number';

export interface CsvColumn {
  key: string;
  type: CsvColumnType;
}

/** The characters that make a spreadsheet read a cell as a formula (OWASP, "CSV Injection"). */
const FORMULA_START = /^[=+\-@\t\r]/;
/** A plain decimal number, as number columns may carry one as text (a payout from toFixed). */
const DECIMAL = /^-?\d+(\.\d+)?$/;

/** A text cell as written: prefixed with ' when it would start a formula. */
export function neutraliseCell(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

type Value = unknown;

function cellOf(value: Value, type: CsvColumnType): string | number | null {
  if (value === null || value === undefined) return null;
  if (type === 'number') {
    if (typeof value === 'number') return Number.isFinite(value) ? value : null;
    // A number column that was handed something else is treated as text, so nothing slips past.
    const text = String(value);
    return DECIMAL.test(text) ? text : neutraliseCell(text);
  }
  return neutraliseCell(value instanceof Date ? value.toISOString() : String(value));
}

export interface CsvOptions {
  /** write the header line (default true); a streamed writer writes it once, then pages without */
  header?: boolean;
}

/**
 * Rows → CSV text: `\n` line ends, a final `\n` (R's read.csv and pandas read it as it is), the
 * columns in the order given. An empty list of rows gives the header line alone.
 */
export function csvLines(rows: readonly object[], columns: readonly CsvColumn[], opts: CsvOptions = {}): string {
  const header = opts.header ?? true;
  if (columns.length === 0) return '';
  const fields = columns.map((c) => neutraliseCell(c.key));
  // papaparse reads an empty `data` as one empty row; write the header alone ourselves
  if (rows.length === 0) return header ? Papa.unparse([fields], { newline: '\n' }) + '\n' : '';
  // any row shape (a codebook entry, a panel row): columns name the keys that are read
  const data = rows.map((row) => columns.map((c) => cellOf(Reflect.get(row, c.key) as Value, c.type)));
  const body = Papa.unparse({ fields, data }, { header, newline: '\n', escapeFormulae: false });
  return body === '' ? '' : body + '\n';
}

/** Columns of the given keys, all of one type (a table whose columns are all text, say). */
export const csvColumns = (keys: readonly string[], type: CsvColumnType): CsvColumn[] => keys.map((key) => ({ key, type }));
