import type { SessionRunner } from '#realtime/runner';
import { rememberSlot } from './remember.server';

// server.ts creates the one SessionRunner of this process and leaves it here; route modules come
// from the build bundle, which holds its own copies of modules, so they reach it through remember().
const slot = () => rememberSlot<SessionRunner>('session-runner');

export function setRunner(r: SessionRunner | undefined) {
  slot().current = r;
}

export function runner(): SessionRunner {
  const r = slot().current;
  if (!r) throw new Error('The session runner is not started (server.ts starts it).');
  return r;
}

/** The runner when this process has one (the production server), else undefined. */
export function runnerIfStarted(): SessionRunner | undefined {
  return slot().current;
}
