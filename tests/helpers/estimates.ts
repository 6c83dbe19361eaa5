// Polls an estimation's status through the real server until it is done or failed; stores a
// simulated panel (the dbf2011 strategies in equal shares, β = 0.9, δ = 0.75) as a dataset.
import { libraryStrategy, STRATEGY_SETS } from '#app/lib/automata';
import { simulatePanel } from '#app/lib/simulate-panel';
import { createDataset } from '#app/models/datasets.server';
import type { EstimateStatus } from '#app/models/estimate.server';
import type { Client } from './http';

export async function simulatedDataset(
  courseId: number,
  userId: number,
  name: string,
  size: { subjects: number; supergames: number; seed: number },
): Promise<number> {
  const strategies = STRATEGY_SETS.dbf2011.map(libraryStrategy);
  const sim = simulatePanel({ strategies, shares: strategies.map(() => 1 / strategies.length), beta: 0.9, delta: 0.75, ...size });
  return createDataset(courseId, userId, name, sim.rows);
}

export async function waitEstimate(c: Client, courseId: number, id: number, timeoutMs = 60_000): Promise<EstimateStatus> {
  for (const until = Date.now() + timeoutMs; ;) {
    const res = await c.get(`/courses/${courseId}/estimates/${id}`);
    if (res.status !== 200) throw new Error(`estimate ${id}: status page answered ${res.status}`);
    const e = (await res.json()) as EstimateStatus;
    if (e.status === 'done' || e.status === 'failed') return e;
    if (Date.now() > until) throw new Error(`estimate ${id} still ${e.status} at ${e.progress}/${e.total}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}
