import { describe, expect, it } from 'vitest';
import { LIBRARY } from '#app/lib/automata';
import { AXELROD_PAYOFFS } from '#app/lib/league-design';
import { roundRobin, standings } from '#app/lib/league';
import { computeLeagueResults } from '#app/lib/league-run';
import { computeLeagueOnWorker } from '#app/lib/league-worker.server';
import { toStrategyFile } from '#app/lib/strategy-file';

const design = { payoffs: { ...AXELROD_PAYOFFS }, delta: 0.9, epsilon: 0.05, matches: 5, generations: 30, seed: 4 };
const entries = LIBRARY.map((a, k) => ({ entryId: k + 1, name: a.name, house: true, strategy: toStrategyFile(a) }));
const numbers = ({ computedAt: _c, ms: _m, ...rest }: ReturnType<typeof computeLeagueResults>) => rest;

describe('a league run on a worker thread', () => {
  it('gives the same numbers as in the thread, and those are the lib’s standings(roundRobin(…))', async () => {
    const onWorker = await computeLeagueOnWorker(design, entries);
    const here = computeLeagueResults(design, entries);
    expect(numbers(onWorker)).toEqual(numbers(here));
    const table = roundRobin(LIBRARY, { game: AXELROD_PAYOFFS, delta: 0.9, epsilon: 0.05 });
    expect(here.perRound).toEqual(table);
    expect(here.standings).toEqual(standings(table));
  });

  it('passes a failure back as an error (a stored entry that is not a strategy is a bug)', async () => {
    const broken = [
      {
        ...entries[0],
        strategy: { ...entries[0].strategy, states: [{ state: 1, plays: 'C' as const, next: { CC: 2, CD: 1, DC: 1, DD: 1 } }] },
      },
    ];
    await expect(computeLeagueOnWorker(design, broken)).rejects.toThrow(/not a valid strategy/);
  });
});
