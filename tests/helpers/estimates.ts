// Polls an estimation's status through the real server until it is done or failed.
import type { EstimateStatus } from '#app/models/estimate.server';
import type { Client } from './http';

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
