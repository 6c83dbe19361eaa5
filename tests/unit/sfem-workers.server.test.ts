import { describe, expect, it } from 'vitest';
import { STRATEGY_SETS, libraryStrategy } from '#app/lib/automata';
import { buildPanel } from '#app/lib/panel';
import { countsTable, estimate, estimateReplicates, summariseReplicates } from '#app/lib/sfem';
import { bootstrapOnWorkers } from '#app/lib/sfem-workers.server';
import { simulatePanel } from '#app/lib/simulate-panel';

describe('bootstrapOnWorkers', () => {
  it('spreads replicates over 2 workers in chunks, reports progress, and equals the in-thread bootstrap', async () => {
    // Source: methods.md §5 (bootstrap over subjects, seeded); equality holds because replicate r
    // always draws from substream r of the seed.
    const strategies = STRATEGY_SETS.dbf2011.map(libraryStrategy);
    const sim = simulatePanel({
      strategies,
      shares: [0.4, 0.1, 0.1, 0.3, 0.05, 0.05],
      beta: 0.9,
      subjects: 60,
      supergames: 6,
      delta: 0.75,
      seed: 5,
    });
    const table = countsTable(buildPanel(sim.rows).panel.subjects, strategies);
    const point = estimate(table);
    const progress: number[] = [];
    const B = 45;
    const onWorkers = await bootstrapOnWorkers(table, point, {
      B,
      seed: 9,
      workers: 2,
      chunk: 7,
      onProgress: (done, total) => progress.push(done / total),
    });
    const inThread = estimateReplicates(table, point, 9, 0, B);
    expect(onWorkers.replicates).toEqual(inThread);
    expect(onWorkers.sdShares).toEqual(summariseReplicates(inThread, 9).sdShares);
    expect(onWorkers.sdBeta).toBeGreaterThan(0);
    expect(progress).toHaveLength(Math.ceil(B / 7));
    expect(progress.at(-1)).toBe(1);
    expect([...progress].sort((a, b) => a - b)).toEqual(progress);
    // the split into chunks does not matter either
    const twoChunks = [...estimateReplicates(table, point, 9, 0, 20), ...estimateReplicates(table, point, 9, 20, B)];
    expect(twoChunks).toEqual(inThread);
  });
});
