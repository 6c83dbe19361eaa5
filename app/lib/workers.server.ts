/**
 * Worker threads for long pure computations (Node only), so they do not hold up the server's event
 * loop (live sessions, pages): the SFEM bootstrap (sfem-workers.server.ts) and league runs
 * (league-worker.server.ts). Each of those files is also its workers' entry point.
 */
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';

/**
 * A worker's entry `rel` (a source file under app/lib). From source (tsx, Vite in development,
 * vitest) `metaUrl` is that file. In the production build the code is bundled into build/server,
 * whose files must not be a worker's entry (they would load the whole app), so the source file is
 * found beside the build and run through tsx, which the server runs with anyway (docs/decisions/010).
 */
export function workerEntry(rel: string, metaUrl: string): URL {
  if (metaUrl.endsWith('.ts')) return new URL(metaUrl);
  let dir = path.dirname(fileURLToPath(metaUrl));
  for (let i = 0; i < 5; i++) {
    if (existsSync(path.join(dir, rel))) return pathToFileURL(path.join(dir, rel));
    dir = path.dirname(dir);
  }
  const fromCwd = path.resolve(rel);
  if (existsSync(fromCwd)) return pathToFileURL(fromCwd);
  throw new Error(`The worker's entry ${rel} was not found beside the build.`);
}

/**
 * Starts a worker on `url`. Node 20 does not pass loader hooks (nor `--import` in execArgv) on to
 * workers, so a TypeScript entry is started by a small script that registers tsx inside the worker
 * first.
 */
export function startWorker(url: URL, workerData: unknown): Worker {
  if (!url.pathname.endsWith('.ts')) return new Worker(url, { workerData });
  const tsxApi = tsxEsmApiUrl();
  return new Worker(`import(${JSON.stringify(tsxApi)}).then((tsx) => { tsx.register(); return import(${JSON.stringify(url.href)}); });`, {
    eval: true,
    workerData,
  });
}

/** tsx's ESM register API (its `--import` entry registers in the main thread only). */
function tsxEsmApiUrl(): string {
  const require = createRequire(import.meta.url);
  const pkgPath = require.resolve('tsx/package.json');
  const pkg = require(pkgPath) as { exports: Record<string, { import: { default: string } }> };
  return new URL(pkg.exports['./esm/api'].import.default, pathToFileURL(pkgPath)).href;
}
