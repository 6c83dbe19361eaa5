import type { SessionRunner } from '#realtime/runner';

// server.ts creates the one SessionRunner of this process and leaves it here; route modules come
// from the build bundle, which holds its own copies of modules, so they reach it through globalThis.
declare global {
  // one per process: kept across Vite's reloads of this module, shared by server.ts and the built bundle
  var __parleyRunner: SessionRunner | undefined;
}
const g = globalThis;

export function setRunner(r: SessionRunner | undefined) {
  g.__parleyRunner = r;
}

export function runner(): SessionRunner {
  if (!g.__parleyRunner) throw new Error('The session runner is not started (server.ts starts it).');
  return g.__parleyRunner;
}

/** The runner when this process has one (the production server), else undefined. */
export function runnerIfStarted(): SessionRunner | undefined {
  return g.__parleyRunner;
}
