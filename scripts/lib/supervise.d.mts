// Types of supervise.mjs for the TypeScript tests that import it.
import type { ChildProcess } from 'node:child_process';

export function howItEnded(code: number | null, signal: NodeJS.Signals | null): string;

export interface Supervisor {
  readonly child: ChildProcess;
  readonly restarts: number;
  stop(signal?: NodeJS.Signals): Promise<void>;
}

export function supervise(opts: {
  name: string;
  spawn: () => ChildProcess;
  maxRestarts?: number;
  windowMs?: number;
  delayMs?: number;
  say?: (line: string) => void;
  onRestart?: (child: ChildProcess) => void;
  onGiveUp: (reason: string) => void;
  now?: () => number;
}): Supervisor;
