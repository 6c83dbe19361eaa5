// A second app server on its own port (same database and build), for tests that must kill a server
// or start one with another environment (a dead mail server, say).
import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';

export class SecondServer {
  process: ChildProcess | null = null;

  constructor(
    readonly port: number,
    /** extra environment; may be changed before start() (a database of the test's own, say) */
    readonly env: Record<string, string> = {},
    /** `log`: its output is appended to this file (else dropped); `startMs`: how long start() waits */
    readonly opts: { log?: string; startMs?: number } = {},
  ) {}

  get base() {
    return `http://127.0.0.1:${this.port}`;
  }

  /** Starts it (its APP_URL is its own address, so forms posted to it pass the Origin check) and waits until /healthz answers. */
  async start() {
    this.process = spawn(process.execPath, ['--import', 'tsx', 'server.ts'], {
      // It takes no background jobs unless a test asks: with its own environment (a dead mail
      // server) or killed mid-run, it would fail or hold other tests' estimations and mails.
      env: { ...process.env, APP_URL: this.base, PARLEY_JOBS: 'off', ...this.env, PORT: String(this.port) },
      stdio: this.opts.log ? ['ignore', 'pipe', 'pipe'] : 'ignore',
    });
    if (this.opts.log) {
      const out = fs.createWriteStream(this.opts.log, { flags: 'a' });
      this.process.stdout?.pipe(out);
      this.process.stderr?.pipe(out);
    }
    const until = Date.now() + (this.opts.startMs ?? 30_000);
    while (Date.now() < until) {
      try {
        if ((await fetch(`${this.base}/healthz`)).ok) return;
      } catch {
        // not listening yet
      }
      await new Promise((r) => setTimeout(r, 150));
    }
    throw new Error(`the second server on port ${this.port} did not start`);
  }

  /** Stops it with a signal and waits for the process to exit. */
  kill(signal: NodeJS.Signals = 'SIGKILL') {
    const p = this.process;
    return new Promise<void>((resolve) => {
      if (!p || p.exitCode !== null || p.signalCode !== null) return resolve();
      p.once('exit', () => resolve());
      p.kill(signal);
    });
  }
}
