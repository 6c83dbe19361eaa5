/**
 * A queue that is fair between keys (courses): the next job comes from the key served least
 * recently among those with jobs waiting (a key never served first; ties by arrival), and within
 * a key in arrival order. So one course's ten estimations do not make another course's one wait
 * for all ten: it runs next. Pure; the estimation runner (app/models/estimate.server.ts) drives it.
 */
export class FairQueue<K, J> {
  private waiting = new Map<K, J[]>();
  /** when each key was last served (a counter), kept after its jobs ran out */
  private served = new Map<K, number>();
  /** when each key's oldest waiting job arrived, to break ties */
  private arrived = new Map<K, number>();
  private clock = 0;

  get size(): number {
    let n = 0;
    for (const jobs of this.waiting.values()) n += jobs.length;
    return n;
  }

  push(key: K, job: J): void {
    const jobs = this.waiting.get(key);
    if (jobs) jobs.push(job);
    else {
      this.waiting.set(key, [job]);
      this.arrived.set(key, ++this.clock);
    }
  }

  /** The next job to run, or undefined when nothing waits. */
  shift(): J | undefined {
    let best: K | undefined;
    let bestServed = Infinity;
    let bestArrived = Infinity;
    for (const key of this.waiting.keys()) {
      const served = this.served.get(key) ?? -1;
      const arrived = this.arrived.get(key)!;
      if (served < bestServed || (served === bestServed && arrived < bestArrived)) {
        best = key;
        bestServed = served;
        bestArrived = arrived;
      }
    }
    if (best === undefined) return undefined;
    const jobs = this.waiting.get(best)!;
    const job = jobs.shift()!;
    this.served.set(best, ++this.clock);
    if (jobs.length === 0) {
      this.waiting.delete(best);
      this.arrived.delete(best);
    }
    return job;
  }
}
