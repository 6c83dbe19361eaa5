import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { libraryStrategy } from '#app/lib/automata';
import { AXELROD_PAYOFFS, type LeagueResults } from '#app/lib/league-design';
import { evolve, roundRobin, standings, survivors } from '#app/lib/league';
import {
  automatonCell,
  entriesCsv,
  ENTRY_COLUMNS,
  evolutionCsv,
  leagueJson,
  matrixCsv,
  RESULT_COLUMNS,
  resultsCsv,
} from '#app/lib/league-export';
import { readStrategyFile, toStrategyFile } from '#app/lib/strategy-file';

const tft = toStrategyFile(libraryStrategy('TFT'));
const alld = toStrategyFile(libraryStrategy('ALLD'));
const entries = [
  { entryId: 11, name: '=HYPERLINK("x")', house: false, strategy: { ...tft, id: 'entry', name: '=HYPERLINK("x")' } },
  { entryId: 12, name: 'Always defect', house: true, strategy: alld },
];
const design = { payoffs: { ...AXELROD_PAYOFFS }, delta: 0.9, epsilon: 0, matches: 0, generations: 5, seed: 1 };
const table = roundRobin([libraryStrategy('TFT'), libraryStrategy('ALLD')], { game: AXELROD_PAYOFFS, delta: 0.9, epsilon: 0 });
const evo = evolve(table, 5);
const results: LeagueResults = {
  version: 1,
  design,
  entries,
  perRound: table,
  standings: standings(table),
  simulated: null,
  evolution: evo,
  survivors: survivors(evo),
  computedAt: '2026-12-02T12:00:00.000Z',
  ms: 1,
};
const parse = (csv: string) => Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true });

describe('league files', () => {
  it('write the automaton in one cell, states from 1, next after CC, CD, DC, DD', () => {
    expect(automatonCell(tft)).toBe('1:C>1,2,1,2 | 2:D>1,2,1,2');
  });

  it('give researchers "Entry <id>" for participants and keep house names; neutralise formula cells', () => {
    const forResearcher = parse(entriesCsv(entries, false));
    expect(forResearcher.meta.fields).toEqual(ENTRY_COLUMNS.map((c) => c.key));
    expect(forResearcher.data.map((r) => r.name)).toEqual(['Entry 11', 'Always defect']);
    const forInstructor = parse(entriesCsv(entries, true));
    // Source: OWASP, "CSV Injection": a text cell starting with = is written with a leading '
    expect(forInstructor.data[0].name).toBe(`'=HYPERLINK("x")`);
  });

  it('rank, matrix and evolution as documented in docs/formats/league.md', () => {
    const ranking = parse(resultsCsv(results, false));
    expect(ranking.meta.fields).toEqual(RESULT_COLUMNS.map((c) => c.key));
    // TFT vs TFT earns R = 3, vs ALLD (S then P forever) (1 − δ)·0 + δ·1 = 0.9; mean 1.95.
    // ALLD vs TFT: T then P: 0.1·5 + 0.9·1 = 1.4; vs ALLD: 1; mean 1.2. Source: common practice
    // (definitions of TFT and ALLD) [calc].
    expect(ranking.data.map((r) => [r.rank, r.entry_id, Number(r.score).toFixed(6)])).toEqual([
      ['1', '11', '1.950000'],
      ['2', '12', '1.200000'],
    ]);
    expect(parse(matrixCsv(results, false)).data).toHaveLength(4);
    expect(parse(evolutionCsv(results, false)).data).toHaveLength(2 * 6);
  });

  it('hand out JSON whose strategies read back as parley-strategy files, without a participant’s name for researchers', () => {
    const j = leagueJson({ id: 1, title: 'L', state: 'run', design, deadline: null }, entries, results, false);
    expect(JSON.stringify(j)).not.toContain('HYPERLINK');
    expect(j.entries[0].strategy).toMatchObject({ id: 'E11', name: 'Entry 11' });
    for (const e of [...j.entries, ...j.results!.entries]) expect(readStrategyFile(e.strategy).ok).toBe(true);
  });
});
