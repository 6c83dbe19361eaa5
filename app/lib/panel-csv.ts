/**
 * Choice-panel CSV → validated rows → Panel. Shared by the CLI (scripts/estimate.ts) and the
 * app's upload, so both accept and reject exactly the same files. No fs: takes the file's text.
 * All-or-nothing: any row error means no panel (every error is reported with its line).
 */
import Papa from 'papaparse';
import { z } from 'zod';
import { STRATEGY_SETS, libraryStrategy } from './automata';
import type { Action, Automaton } from './automata';
import { buildPanel, parseWindow } from './panel';
import type { BuiltPanel, ChoiceRow, GroupBy, PanelIssue } from './panel';
import { estimateGroups } from './sfem';
import type { EstimateOptions, GroupEstimate } from './sfem';

/** Which CSV column holds each field. */
export interface ColumnMap {
  session: string;
  treatment: string;
  subject: string;
  partner: string;
  supergame: string;
  round: string;
  action: string;
  partnerAction: string;
}

/** Parley's own export (product.md, "Data"). */
export const PARLEY_COLUMNS: ColumnMap = {
  session: 'session',
  treatment: 'treatment',
  subject: 'pseudonym',
  partner: 'partner',
  supergame: 'supergame',
  round: 'round',
  action: 'action',
  partnerAction: 'partner_action',
};

const FIELD_ALIASES: Record<string, keyof ColumnMap> = {
  session: 'session',
  treatment: 'treatment',
  subject: 'subject',
  pseudonym: 'subject',
  partner: 'partner',
  supergame: 'supergame',
  round: 'round',
  action: 'action',
  partner_action: 'partnerAction',
  partnerAction: 'partnerAction',
};

/** `["subject=subject", "action=cooperate", …]` (the CLI's --map) → a partial column map. */
export function parseColumnMap(pairs: readonly string[]): Partial<ColumnMap> {
  const map: Partial<ColumnMap> = {};
  for (const pair of pairs) {
    const m = /^([A-Za-z_]+)=(.+)$/.exec(pair.trim());
    const field = m ? FIELD_ALIASES[m[1]] : undefined;
    if (!m || !field)
      throw new Error(`Bad column mapping "${pair}": use field=column with field one of ${Object.keys(FIELD_ALIASES).join(', ')}`);
    map[field] = m[2];
  }
  return map;
}

/** C/D as exported by Parley; 1/0 (cooperate/defect) as in many published panels. */
const actionSchema = z
  .string()
  .trim()
  .transform((v) => v.toUpperCase())
  .pipe(z.enum(['C', 'D', '1', '0'], { error: 'must be C or D (or 1 = cooperate, 0 = defect)' }))
  .transform((v): Action => (v === 'C' || v === '1' ? 'C' : 'D'));

const text = z.string().trim().min(1, 'must not be empty');
const positiveInt = z
  .string()
  .trim()
  .regex(/^\d+$/, 'must be a whole number ≥ 1')
  .transform(Number)
  .pipe(z.number().int().min(1, 'must be a whole number ≥ 1'));

const rowSchema = z.object({
  session: text,
  treatment: text,
  subject: text,
  partner: z.string().trim(),
  supergame: positiveInt,
  round: positiveInt,
  action: actionSchema,
  partnerAction: actionSchema,
});

export interface ParsedCsv {
  rows: ChoiceRow[];
  errors: PanelIssue[];
}

/** Parses and validates every row; `map` overrides PARLEY_COLUMNS field by field. */
export function parseChoiceCsv(csvText: string, map: Partial<ColumnMap> = {}): ParsedCsv {
  const columns: ColumnMap = { ...PARLEY_COLUMNS, ...map };
  const errors: PanelIssue[] = [];
  const rows: ChoiceRow[] = [];
  const input = csvText.charCodeAt(0) === 0xfeff ? csvText.slice(1) : csvText;

  // Lines are counted from the parser's cursor, so quoted line breaks keep the numbers right.
  let header: string[] | null = null;
  let index: Record<keyof ColumnMap, number> | null = null;
  let cursor = 0;
  let line = 1;
  const advanceTo = (pos: number) => {
    for (; cursor < pos; cursor++) if (input.charCodeAt(cursor) === 10) line++;
  };

  Papa.parse<string[]>(input, {
    header: false,
    skipEmptyLines: false,
    step: (result) => {
      const rowLine = line;
      advanceTo(result.meta.cursor);
      const cells = result.data;
      if (cells.length === 1 && cells[0].trim() === '') return;
      for (const e of result.errors) errors.push({ line: rowLine, message: `CSV: ${e.message}` });
      if (!header) {
        header = cells.map((c) => c.trim());
        const found = {} as Record<keyof ColumnMap, number>;
        for (const field of Object.keys(columns) as (keyof ColumnMap)[]) {
          const at = header.indexOf(columns[field]);
          if (at < 0)
            errors.push({
              line: rowLine,
              message: `column "${columns[field]}" (${field}) not found; map another with ${field}=<column>`,
            });
          found[field] = at;
        }
        index = errors.length === 0 ? found : null;
        return;
      }
      if (!index) return;
      const raw: Record<string, string> = {};
      for (const field of Object.keys(index) as (keyof ColumnMap)[]) raw[field] = cells[index[field]] ?? '';
      const parsed = rowSchema.safeParse(raw);
      if (!parsed.success) {
        for (const issue of parsed.error.issues) {
          const field = String(issue.path[0] ?? '') as keyof ColumnMap;
          const column = columns[field] ?? field;
          errors.push({ line: rowLine, message: `${column}: ${issue.message} (got "${raw[field] ?? ''}")` });
        }
        return;
      }
      rows.push({ ...parsed.data, line: rowLine });
    },
  });
  if (!header) errors.push({ line: null, message: 'the file is empty' });
  return { rows, errors };
}

/** CSV text → Panel, all-or-nothing: errors from parsing and from the panel checks together. */
export function readChoiceCsv(csvText: string, map: Partial<ColumnMap> = {}): BuiltPanel {
  const parsed = parseChoiceCsv(csvText, map);
  const built = buildPanel(parsed.rows);
  const errors = [...parsed.errors, ...built.errors].sort((a, b) => (a.line ?? 0) - (b.line ?? 0));
  if (errors.length > 0) return { panel: { subjects: [], supergames: [] }, errors, warnings: built.warnings };
  return built;
}

/** "ALLD,ALLC,Grim" → library automata, in that order (unknown names throw). */
export function parseStrategyList(list: string): Automaton[] {
  const ids = list
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);
  if (ids.length === 0) throw new Error('No strategies given');
  if (new Set(ids).size !== ids.length) throw new Error(`A strategy is listed twice in "${list}"`);
  return ids.map(libraryStrategy);
}

export interface CsvEstimationRequest extends EstimateOptions {
  /** CLI-style mappings (`action=cooperate`) or a column map */
  map?: readonly string[] | Partial<ColumnMap>;
  by?: GroupBy;
  /** `all`, `after-rounds:110`, `last:10`, `supergames:5-20` */
  window?: string;
  /** comma-separated library ids (default: Dal Bó & Fréchette 2011's six) */
  strategies?: string;
}

export interface CsvEstimation {
  errors: PanelIssue[];
  warnings: PanelIssue[];
  groups: GroupEstimate[];
}

/**
 * CSV text → point estimates per group: the one path of the CLI and the app's upload
 * (parse → validate → panel → window → groups → SFEM). Bad options throw; bad data come back as
 * errors with no estimate.
 */
export function estimateFromCsv(csvText: string, request: CsvEstimationRequest = {}): CsvEstimation {
  const map = Array.isArray(request.map) ? parseColumnMap(request.map as readonly string[]) : ((request.map ?? {}) as Partial<ColumnMap>);
  const window = parseWindow(request.window ?? 'all');
  const strategies = parseStrategyList(request.strategies ?? STRATEGY_SETS.dbf2011.join(','));
  const built = readChoiceCsv(csvText, map);
  if (built.errors.length > 0) return { errors: built.errors, warnings: built.warnings, groups: [] };
  const groups = estimateGroups(built.panel, { ...request, by: request.by ?? 'treatment', window, strategies });
  return { errors: [], warnings: built.warnings, groups };
}
