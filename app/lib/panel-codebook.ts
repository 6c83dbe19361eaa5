/**
 * The codebook of Parley's choice panel (product.md, "Data"): every column of the export, its
 * meaning, type and values. Pure, so the Data page, the README inside a zip and the API docs all
 * show the same words. The column names are also what app/lib/panel-csv.ts reads back.
 */
import { type CsvColumn, csvColumns, csvLines } from './csv';

export interface CodebookEntry {
  column: string;
  type: 'integer' | 'number' | 'text' | 'timestamp';
  meaning: string;
  values: string;
}

export const PANEL_CODEBOOK = [
  { column: 'session', type: 'integer', meaning: 'Parley’s id of the session (one live run of a design)', values: 'positive integer' },
  {
    column: 'treatment',
    type: 'text',
    meaning:
      'name of the design the session ran, frozen when it opened (“Name (v2)” for a later version of a design). A label only: names need not be unique, and two sessions are the same treatment when R, S, T, P, delta and the termination scheme (with its block size) agree, which is how Parley’s Debrief and estimation group sessions',
    values: 'free text',
  },
  { column: 'R', type: 'number', meaning: 'stage payoff when both choose C (reward)', values: 'points; T > R > P > S' },
  { column: 'S', type: 'number', meaning: 'stage payoff for C against D (sucker)', values: 'points' },
  { column: 'T', type: 'number', meaning: 'stage payoff for D against C (temptation)', values: 'points' },
  { column: 'P', type: 'number', meaning: 'stage payoff when both choose D (punishment)', values: 'points' },
  { column: 'delta', type: 'number', meaning: 'δ, the probability that a supergame continues after a round', values: '0 < delta < 1' },
  {
    column: 'pseudonym',
    type: 'text',
    meaning: 'the participant’s code in this session (per session: the same person has another code in another session)',
    values: 'P-001, P-002, …',
  },
  {
    column: 'partner',
    type: 'text',
    meaning:
      'the partner in this round: a pseudonym, or computer:<strategy> when a disclosed computer chose for the partner’s seat (odd head-count, or a participant handed to a computer)',
    values: 'P-… or computer:TFT, computer:Grim, …',
  },
  {
    column: 'supergame',
    type: 'integer',
    meaning: 'number of the supergame (one repeated game with one partner) in the session',
    values: '1, 2, …',
  },
  {
    column: 'round',
    type: 'integer',
    meaning: 'round within the supergame',
    values: '1 … supergame_length (block termination: rounds after the end are played, not paid)',
  },
  {
    column: 'action',
    type: 'text',
    meaning: 'the participant’s action, whatever the labels shown on the phone',
    values: 'C (cooperate) or D (defect)',
  },
  { column: 'partner_action', type: 'text', meaning: 'the partner’s action in the same round', values: 'C or D' },
  {
    column: 'payoff',
    type: 'number',
    meaning: 'the participant’s stage payoff this round, from the frozen design',
    values: 'one of R, S, T, P; counts toward points only when round ≤ supergame_length',
  },
  {
    column: 'source',
    type: 'text',
    meaning:
      'who chose the action: the participant, the design’s timeout rule when the round timer ran out, or a computer playing the participant’s seat after a hand-over',
    values: 'player, timeout, computer',
  },
  {
    column: 'decision_ms',
    type: 'integer',
    meaning:
      'milliseconds from the round opening to this choice, paused time excluded; time in which the server could not be reached (a restart or a database outage, after which the round got its full time again) is included',
    values: '≥ 0',
  },
  {
    column: 'draw',
    type: 'integer',
    meaning: 'the termination draw made after this round (common to all pairs of the session)',
    values: '1 … 100 (1 … 1000 or 1 … 10000 when 100·δ is not whole); the supergame continues while draw ≤ that maximum × δ',
  },
  {
    column: 'supergame_length',
    type: 'integer',
    meaning: 'L, the rounds of this supergame that count (first draw above the cut-off)',
    values: '≥ 1',
  },
  {
    column: 'timestamp',
    type: 'timestamp',
    meaning: 'server time of the choice',
    values: 'ISO 8601 in UTC, e.g. 2027-03-03T10:21:07.412Z',
  },
  {
    column: 'paid',
    type: 'integer',
    meaning:
      'whether the round counts toward points: round ≤ supergame_length. Under block termination the rounds of the last block after the supergame really ended are played but not paid',
    values: '1 (paid) or 0 (unpaid)',
  },
  {
    column: 'origin',
    type: 'text',
    meaning:
      'where the choice came from: own = the participant’s own choice in a paid round; timeout = filled by the design’s timeout rule; computer_seat = a computer played the participant’s seat after a hand-over; unpaid_round = a round after the supergame ended (block termination), whoever chose. Parley’s cooperation figures and estimations use origin = own unless the Debrief’s switch includes every origin',
    values: 'own, timeout, computer_seat, unpaid_round',
  },
  {
    column: 'partner_source',
    type: 'text',
    meaning: 'who chose the partner’s action, as in source (computer also for a disclosed odd-count computer partner)',
    values: 'player, timeout, computer',
  },
  {
    column: 'computer_partner',
    type: 'integer',
    meaning:
      'whether a computer chose for the partner’s seat in any round of this supergame (the disclosed odd-count partner, or the partner handed to a computer); the participant’s own choices against it are origin = own',
    values: '1 or 0',
  },
] as const satisfies readonly CodebookEntry[];

/**
 * What is not a row, and who is left out: said in the codebook's README and on the Data page
 * (docs/decisions/026).
 */
export const PANEL_NOTES = [
  'Half-finished rounds are not rows: a round in which only one of the pair chose (the session was still running when the panel was read, or was ended by “End now” in the middle of the round) has no partner action and no payoff. Parley’s figures and estimations leave them out and say how many.',
  'Analyses on Parley use the participants’ own choices in paid rounds (origin = own) unless switched to every origin; an estimation cuts each participant’s supergame at its first choice that is not, because a strategy’s prediction in a round depends on every earlier round.',
  'De-identified panels, chart downloads, the API and estimations leave out participants who declined research consent; the class’s own Debrief on screen shows their play to the class.',
] as const;

/** Extra columns of the identified export (instructors only, logged). */
export const IDENTIFIED_CODEBOOK = [
  { column: 'name', type: 'text', meaning: 'the participant’s name on Parley (personal data)', values: 'free text, empty when unknown' },
  { column: 'email', type: 'text', meaning: 'the participant’s e-mail address (personal data)', values: 'e-mail address' },
  {
    column: 'student_id',
    type: 'text',
    meaning: 'the student id from the course roster (personal data)',
    values: 'free text, empty when unknown',
  },
  { column: 'consent', type: 'text', meaning: 'research consent recorded in the session', values: 'yes, no, or not asked' },
] as const satisfies readonly CodebookEntry[];

export type PanelColumn = (typeof PANEL_CODEBOOK)[number]['column'];
export type IdentifiedColumn = (typeof IDENTIFIED_CODEBOOK)[number]['column'];

export const PANEL_COLUMNS: PanelColumn[] = PANEL_CODEBOOK.map((c) => c.column);
export const IDENTIFIED_COLUMNS: (PanelColumn | IdentifiedColumn)[] = [...PANEL_COLUMNS, ...IDENTIFIED_CODEBOOK.map((c) => c.column)];

export function codebookFor(identified: boolean): CodebookEntry[] {
  return identified ? [...PANEL_CODEBOOK, ...IDENTIFIED_CODEBOOK] : [...PANEL_CODEBOOK];
}

/** The panel's columns for the CSV writer, typed by the codebook: numbers stay numbers. */
export function panelCsvColumns(identified: boolean): CsvColumn[] {
  return codebookFor(identified).map((c) => ({ key: c.column, type: c.type === 'integer' || c.type === 'number' ? 'number' : 'text' }));
}

/** How every CSV Parley writes treats text that a spreadsheet would run (app/lib/csv.ts). */
export const FORMULA_NOTE =
  "A text cell that begins with =, +, -, @, a tab or a carriage return is prefixed with a single quote ('), so that spreadsheets show it as text instead of running it as a formula.";

export function codebookCsv(identified = false): string {
  return csvLines(codebookFor(identified), csvColumns(['column', 'type', 'meaning', 'values'], 'text'));
}

const cell = (s: string) => s.replace(/\|/g, '\\|');

/** The README placed inside a zip of several files: what is in it, the cautions, the codebook. */
export function panelReadme(opts: {
  course: string;
  sessions: { id: number; treatment: string; simulated: boolean }[];
  identified: boolean;
  files: string[];
  createdAt: Date;
}): string {
  const lines = [
    `# Choice panel — ${opts.course}`,
    '',
    `Exported from Parley on ${opts.createdAt.toISOString()}.`,
    '',
    '## Files',
    '',
    ...opts.files.map((f) => `- \`${f}\``),
    '',
    '## Sessions',
    '',
    ...opts.sessions.map(
      (s) => `- session ${s.id}: ${s.treatment}${s.simulated ? ' (simulated demo data: the choices are invented)' : ''}`,
    ),
    '',
    '## Cautions',
    '',
    opts.identified
      ? '- This export is IDENTIFIED: it carries names, e-mail addresses and student ids. It is personal data under your institution’s privacy rules; keep it apart from research files and delete it when no longer needed.'
      : '- De-identified: pseudonyms only (no names, e-mail addresses, student ids or network addresses). Participants who declined research consent are left out.',
    '- Using classroom data for research needs your institution’s ethics-board approval and the participants’ informed consent.',
    '',
    '## Reading it',
    '',
    'One row per participant × supergame × round; a header line, no index column, `.` as the decimal mark, timestamps in ISO 8601 (UTC).',
    '',
    ...PANEL_NOTES.map((n) => `- ${n}`),
    '',
    'The participants’ own choices in paid rounds, as Parley’s figures use them:',
    '',
    FORMULA_NOTE,
    '',
    '```r',
    'panel <- read.csv("panel.csv")',
    'own <- subset(panel, origin == "own")',
    '```',
    '',
    '```python',
    'panel = pandas.read_csv("panel.csv", parse_dates=["timestamp"])',
    'own = panel[panel.origin == "own"]',
    '```',
    '',
    '## Codebook',
    '',
    '| column | type | meaning | values |',
    '|---|---|---|---|',
    ...codebookFor(opts.identified).map((c) => `| ${c.column} | ${c.type} | ${cell(c.meaning)} | ${cell(c.values)} |`),
    '',
  ];
  return lines.join('\n');
}
