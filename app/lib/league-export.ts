/**
 * A league's entries and results as files (docs/formats/league.md): CSV through the one CSV writer
 * (app/lib/csv.ts), JSON with each automaton in the parley-strategy v1 format
 * (docs/formats/strategy.md). Pure: the routes and the API call these with what they may show.
 *
 * `label` decides what names a file carries: staff who see the roster get the entries' names;
 * researchers and API tokens get participants' entries as "Entry <id>" (house entries keep their
 * library names), as researchers never see names (docs/security.md).
 */
import { type CsvColumn, csvLines } from './csv';
import type { LeagueDesign, LeagueResults, LeagueState } from './league-design';
import type { StrategyFile } from './strategy-file';

export const LEAGUE_FORMAT = 'parley-league';
export const LEAGUE_FORMAT_VERSION = 1;

export interface ExportEntry {
  entryId: number;
  name: string;
  house: boolean;
  strategy: StrategyFile;
}

/** The name a file or a researcher sees for an entry. */
export const entryLabel = (e: { entryId: number; name: string; house: boolean }, showNames: boolean) =>
  e.house || showNames ? e.name : `Entry ${e.entryId}`;

/**
 * The entry's strategy file as handed out: a participant's carries its label as name and
 * `E<entry id>` as id (the stored file's name is the entry's name, which a researcher may not see).
 */
export const exportedStrategy = (e: ExportEntry, showNames: boolean): StrategyFile =>
  e.house ? e.strategy : { ...e.strategy, id: `E${e.entryId}`, name: entryLabel(e, showNames) };

/** The automaton as one compact cell: "1:C>1,2,1,2 | 2:D>1,2,1,2" (state: action > next after CC, CD, DC, DD). */
export function automatonCell(f: StrategyFile): string {
  return f.states.map((s) => `${s.state}:${s.plays}>${s.next.CC},${s.next.CD},${s.next.DC},${s.next.DD}`).join(' | ');
}

const text = (key: string): CsvColumn => ({ key, type: 'text' });
const num = (key: string): CsvColumn => ({ key, type: 'number' });

export const ENTRY_COLUMNS: CsvColumn[] = [num('entry_id'), text('name'), text('house'), num('states'), text('automaton')];

export function entriesCsv(entries: readonly ExportEntry[], showNames: boolean): string {
  return csvLines(
    entries.map((e) => ({
      entry_id: e.entryId,
      name: entryLabel(e, showNames),
      house: e.house ? 'yes' : 'no',
      states: e.strategy.states.length,
      automaton: automatonCell(e.strategy),
    })),
    ENTRY_COLUMNS,
  );
}

export const RESULT_COLUMNS: CsvColumn[] = [
  num('rank'),
  num('entry_id'),
  text('name'),
  text('house'),
  num('score'),
  num('sim_score'),
  num('sim_se'),
  num('final_share'),
];

/** The ranking: one row per entry, best first. */
export function resultsCsv(results: LeagueResults, showNames: boolean): string {
  const last = results.evolution.shares[results.evolution.shares.length - 1] ?? [];
  return csvLines(
    results.standings.map((s) => {
      const e = results.entries[s.entry];
      return {
        rank: s.rank,
        entry_id: e.entryId,
        name: entryLabel(e, showNames),
        house: e.house ? 'yes' : 'no',
        score: s.score,
        sim_score: results.simulated?.scores[s.entry].score ?? null,
        sim_se: results.simulated?.scores[s.entry].se ?? null,
        final_share: last[s.entry] ?? null,
      };
    }),
    RESULT_COLUMNS,
  );
}

export const MATRIX_COLUMNS: CsvColumn[] = [num('row_entry_id'), text('row_name'), num('col_entry_id'), text('col_name'), num('per_round')];

/** The pairwise matrix in long form: the row entry's per-round value against the column entry. */
export function matrixCsv(results: LeagueResults, showNames: boolean): string {
  const rows: object[] = [];
  results.perRound.forEach((row, i) =>
    row.forEach((v, j) => {
      const a = results.entries[i];
      const b = results.entries[j];
      rows.push({
        row_entry_id: a.entryId,
        row_name: entryLabel(a, showNames),
        col_entry_id: b.entryId,
        col_name: entryLabel(b, showNames),
        per_round: v,
      });
    }),
  );
  return csvLines(rows, MATRIX_COLUMNS);
}

/** The evolution in long form: generation, entry, share. */
export const EVOLUTION_COLUMNS: CsvColumn[] = [num('generation'), num('entry_id'), text('name'), num('share')];

export function evolutionCsv(results: LeagueResults, showNames: boolean): string {
  const rows: object[] = [];
  results.evolution.shares.forEach((shares, g) =>
    shares.forEach((share, k) => {
      const e = results.entries[k];
      rows.push({ generation: g, entry_id: e.entryId, name: entryLabel(e, showNames), share });
    }),
  );
  return csvLines(rows, EVOLUTION_COLUMNS);
}

export interface LeagueJson {
  format: typeof LEAGUE_FORMAT;
  version: typeof LEAGUE_FORMAT_VERSION;
  league: { id: number; title: string; state: LeagueState; design: LeagueDesign; deadline: string | null };
  /** the entries now (for a league that has run, those the results were computed from are in results.entries) */
  entries: { entry_id: number; name: string; house: boolean; strategy: StrategyFile }[];
  results:
    null | (Omit<LeagueResults, 'entries'> & { entries: { entry_id: number; name: string; house: boolean; strategy: StrategyFile }[] });
}

export function leagueJson(
  league: { id: number; title: string; state: LeagueState; design: LeagueDesign; deadline: Date | null },
  entries: readonly ExportEntry[],
  results: LeagueResults | null,
  showNames: boolean,
): LeagueJson {
  const out = (e: ExportEntry) => ({
    entry_id: e.entryId,
    name: entryLabel(e, showNames),
    house: e.house,
    strategy: exportedStrategy(e, showNames),
  });
  return {
    format: LEAGUE_FORMAT,
    version: LEAGUE_FORMAT_VERSION,
    league: {
      id: league.id,
      title: league.title,
      state: league.state,
      design: league.design,
      deadline: league.deadline?.toISOString() ?? null,
    },
    entries: entries.map(out),
    results: results ? { ...results, entries: results.entries.map(out) } : null,
  };
}
