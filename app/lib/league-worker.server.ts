/**
 * A league's run on a worker thread (Node only): a 200-entry league takes seconds of pure
 * computation (npm run bench:league), which on the server's own thread would hold up every live
 * session and page meanwhile. This same file is the worker's entry point (see the bottom).
 */
import path from 'node:path';
import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import type { LeagueDesign, LeagueResults, ResultEntry } from './league-design';
import { computeLeagueResults } from './league-run';
import { startWorker, workerEntry } from './workers.server';

interface Init {
  role: 'league-run';
  design: LeagueDesign;
  entries: ResultEntry[];
}

type Answer = { ok: true; results: LeagueResults } | { ok: false; message: string };

/** computeLeagueResults on a worker thread: the same numbers, off the event loop. */
export async function computeLeagueOnWorker(design: LeagueDesign, entries: readonly ResultEntry[]): Promise<LeagueResults> {
  const init: Init = { role: 'league-run', design, entries: [...entries] };
  const worker = startWorker(workerEntry(path.join('app', 'lib', 'league-worker.server.ts'), import.meta.url), init);
  try {
    return await new Promise<LeagueResults>((resolve, reject) => {
      worker.on('message', (a: Answer) => (a.ok ? resolve(a.results) : reject(new Error(a.message))));
      worker.on('error', reject);
      worker.on('exit', (code) => reject(new Error(`the league worker stopped with exit code ${code}`)));
    });
  } finally {
    await worker.terminate();
  }
}

// Worker side: compute and answer once.
if (!isMainThread && parentPort && (workerData as Init | undefined)?.role === 'league-run') {
  const { design, entries } = workerData as Init;
  let answer: Answer;
  try {
    answer = { ok: true, results: computeLeagueResults(design, entries) };
  } catch (e) {
    answer = { ok: false, message: e instanceof Error ? e.message : String(e) };
  }
  parentPort.postMessage(answer);
}
