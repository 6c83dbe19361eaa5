/**
 * The SFEM bootstrap spread over worker threads (Node only). Replicates are handed out in chunks
 * so progress can be reported; replicate r always uses substream r of the seed (sfem.ts), so the
 * result does not depend on the number of workers or the chunk size.
 * This same file is the workers' entry point (see the bottom).
 */
import path from 'node:path';
import { type Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { estimateReplicates, summariseReplicates } from './sfem';
import { startWorker, workerEntry } from './workers.server';
import type { BootstrapSummary, CountsTable, Replicate, ReplicateOptions } from './sfem';

interface Job {
  from: number;
  to: number;
}
interface Init {
  role: 'sfem-bootstrap';
  table: CountsTable;
  point: { shares: number[]; beta: number };
  seed: number;
  options: ReplicateOptions;
}

export interface WorkerBootstrapOptions {
  B: number;
  seed: number;
  workers?: number;
  /** replicates per message (default 10) */
  chunk?: number;
  onProgress?: (done: number, total: number) => void;
  replicate?: ReplicateOptions;
  /** The worker entry (default: workerUrl()); when it is TypeScript the workers load it through tsx. */
  workerUrl?: URL;
}

export async function bootstrapOnWorkers(
  table: CountsTable,
  point: { shares: ArrayLike<number>; beta: number },
  options: WorkerBootstrapOptions,
): Promise<BootstrapSummary & { replicates: Replicate[] }> {
  const { B, seed } = options;
  const chunk = Math.max(1, options.chunk ?? 10);
  const nWorkers = Math.max(1, Math.min(options.workers ?? 2, Math.ceil(B / chunk)));
  const init: Init = {
    role: 'sfem-bootstrap',
    table,
    point: { shares: Array.from(point.shares), beta: point.beta },
    seed,
    options: options.replicate ?? {},
  };
  const url = options.workerUrl ?? workerUrl();
  const spawn = () => startWorker(url, init);

  const replicates: Replicate[] = new Array(B);
  let next = 0;
  let done = 0;
  const workers: Worker[] = [];
  try {
    await new Promise<void>((resolve, reject) => {
      if (B === 0) return resolve();
      const give = (w: Worker) => {
        if (next >= B) return;
        const job: Job = { from: next, to: Math.min(B, next + chunk) };
        next = job.to;
        w.postMessage(job);
      };
      for (let i = 0; i < nWorkers; i++) {
        const w = spawn();
        workers.push(w);
        w.on('message', (msg: { from: number; replicates: Replicate[] }) => {
          msg.replicates.forEach((r, j) => (replicates[msg.from + j] = r));
          done += msg.replicates.length;
          options.onProgress?.(done, B);
          if (done === B) resolve();
          else give(w);
        });
        w.on('error', reject);
        w.on('exit', (code) => {
          if (code !== 0 && done < B) reject(new Error(`bootstrap worker stopped with exit code ${code}`));
        });
        give(w);
      }
    });
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return { ...summariseReplicates(replicates, seed), replicates };
}

/** The bootstrap workers' entry: this file (beside the build in production; workers.server.ts). */
export function workerUrl(): URL {
  return workerEntry(path.join('app', 'lib', 'sfem-workers.server.ts'), import.meta.url);
}

// Worker side: answer each chunk with its replicates.
if (!isMainThread && parentPort && (workerData as Init | undefined)?.role === 'sfem-bootstrap') {
  const { table, point, seed, options } = workerData as Init;
  const port = parentPort;
  port.on('message', (job: Job) => {
    port.postMessage({ from: job.from, replicates: estimateReplicates(table, point, seed, job.from, job.to, options) });
  });
}
