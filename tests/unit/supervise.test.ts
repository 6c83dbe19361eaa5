// `npm start` keeps Parley running (scripts/lib/supervise.mjs): restarts on any death, gives up
// after too many deaths in the window, never restarts after stop(). Real child processes, small ones.
import { type ChildProcess, spawn } from 'node:child_process';
import { afterEach, describe, expect, it } from 'vitest';
import { howItEnded, supervise, type Supervisor } from '../../scripts/lib/supervise.mjs';

const children: ChildProcess[] = [];
/** A process that lives until killed, or exits at once with `code`. */
function node(code?: number) {
  const c = spawn(process.execPath, ['-e', code === undefined ? 'setInterval(() => {}, 1000)' : `process.exit(${code})`], {
    stdio: 'ignore',
  });
  children.push(c);
  return c;
}
const exited = (c: ChildProcess) =>
  new Promise<void>((r) => (c.exitCode !== null || c.signalCode !== null ? r() : c.once('exit', () => r())));
const until = async (test: () => boolean, ms = 10_000) => {
  const end = Date.now() + ms;
  while (!test()) {
    if (Date.now() > end) throw new Error('condition not met in time');
    await new Promise((r) => setTimeout(r, 20));
  }
};

let sup: Supervisor | undefined;
afterEach(async () => {
  await sup?.stop('SIGKILL');
  for (const c of children.splice(0)) if (c.exitCode === null && c.signalCode === null) c.kill('SIGKILL');
});

describe('supervise', () => {
  it('says how a process ended', () => {
    expect(howItEnded(null, 'SIGKILL')).toBe('was killed by SIGKILL');
    expect(howItEnded(3, null)).toBe('exited with code 3');
  });

  it('restarts a process killed by any signal, and one that exits with any code, and says so', async () => {
    const lines: string[] = [];
    const restarted: ChildProcess[] = [];
    sup = supervise({
      name: 'Parley',
      spawn: () => node(),
      delayMs: 10,
      say: (l) => lines.push(l),
      onRestart: (c) => restarted.push(c),
      onGiveUp: () => lines.push('gave up'),
    });
    const first = sup.child;
    first.kill('SIGKILL');
    await until(() => restarted.length === 1);
    expect(sup.child).not.toBe(first);
    expect(sup.child.pid).toBeGreaterThan(0);
    expect(lines[0]).toBe('Parley was killed by SIGKILL; restarting it (1 of 3 within 60 s)');
    sup.child.kill('SIGTERM');
    await until(() => restarted.length === 2);
    expect(lines[1]).toMatch(/^Parley was killed by SIGTERM; restarting it \(2 of 3/);
    expect(sup.restarts).toBe(2);
    expect(lines).not.toContain('gave up');
  });

  it('gives up after more deaths than allowed within the window, and restarts again once the window has passed', async () => {
    let clock = 0;
    const reasons: string[] = [];
    // Exits with code 1 at once, as a server that cannot start would.
    sup = supervise({
      name: 'Parley',
      spawn: () => node(1),
      maxRestarts: 2,
      windowMs: 60_000,
      delayMs: 10,
      now: () => clock,
      onGiveUp: (r) => reasons.push(r),
    });
    await until(() => reasons.length === 1);
    expect(reasons[0]).toBe('Parley exited with code 1, after 2 restart(s) within 60 s');
    // Stopped for good: no more processes are started after giving up.
    const count = children.length;
    await new Promise((r) => setTimeout(r, 200));
    expect(children.length).toBe(count);
    expect(count).toBe(3);

    // Deaths spread out over more than the window never give up.
    const spread: string[] = [];
    const restarted: ChildProcess[] = [];
    sup = supervise({
      name: 'P',
      spawn: () => node(),
      maxRestarts: 1,
      windowMs: 1000,
      delayMs: 10,
      now: () => clock,
      onRestart: (c) => restarted.push(c),
      onGiveUp: (r) => spread.push(r),
    });
    for (let i = 1; i <= 3; i++) {
      clock += 5000;
      sup.child.kill('SIGKILL');
      await until(() => restarted.length === i);
    }
    expect(spread).toEqual([]);
  });

  it('never restarts after stop(), even when the process was already dying', async () => {
    const restarted: ChildProcess[] = [];
    sup = supervise({ name: 'Parley', spawn: () => node(), delayMs: 50, onRestart: (c) => restarted.push(c), onGiveUp: () => undefined });
    const first = sup.child;
    // Ctrl-C reaches the child and `npm start` alike: the child dies, then we stop.
    first.kill('SIGINT');
    await exited(first);
    await sup.stop();
    await new Promise((r) => setTimeout(r, 200));
    expect(restarted).toEqual([]);
    expect(children.length).toBe(1);
  });
});
