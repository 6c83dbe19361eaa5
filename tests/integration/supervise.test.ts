// `npm start` supervises Parley: a server process killed with SIGKILL is reported and restarted
// (on /healthz again), and Ctrl-C still stops everything. Runs the real scripts/start.mjs on ports
// of its own (this worktree's test ports + 70: the restart test takes + 40) with its own data folder.
import { type ChildProcess, spawn, spawnSync } from 'node:child_process';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { alive } from '#tests/helpers/processes';

const portOf = (url: string | undefined, fallback: number) => (url ? Number(new URL(url.replace(/^mysql:/, 'http:')).port) : fallback);
const ports = {
  PORT: String(portOf(process.env.PARLEY_TEST_URL, 3101) + 70),
  PARLEY_DB_PORT: String(portOf(process.env.DATABASE_URL, 3317) + 70),
  PARLEY_SMTP_PORT: String(portOf(process.env.SMTP_URL?.replace(/^smtp:/, 'http:'), 1026) + 70),
  PARLEY_MAIL_WEB_PORT: String(portOf(process.env.PARLEY_MAIL_API, 1081) + 70),
};
const base = `http://127.0.0.1:${ports.PORT}`;

let start: ChildProcess | null = null;
const output: string[] = [];
const pids: number[] = [];

function waitForLine(pattern: RegExp, ms: number): Promise<RegExpExecArray> {
  return new Promise((resolve, reject) => {
    const seen = output.join('');
    const m = pattern.exec(seen);
    if (m) return resolve(m);
    const t = setTimeout(
      () => reject(new Error(`no line matching ${pattern} within ${ms} ms; output:\n${output.join('').slice(-2000)}`)),
      ms,
    );
    const on = () => {
      const found = pattern.exec(output.join(''));
      if (!found) return;
      clearTimeout(t);
      start?.stdout?.off('data', on);
      resolve(found);
    };
    start?.stdout?.on('data', on);
  });
}

/** The process listening on Parley's port, as an operator finds it (`ss -ltnp`). */
function listener(port: string): number | null {
  const out = spawnSync('ss', ['-ltnpH', `sport = :${port}`], { encoding: 'utf8' }).stdout ?? '';
  const m = /pid=(\d+)/.exec(out);
  return m ? Number(m[1]) : null;
}

const healthy = async () => {
  try {
    return (await fetch(`${base}/healthz`, { signal: AbortSignal.timeout(2000) })).ok;
  } catch {
    return false;
  }
};

afterAll(async () => {
  if (start && start.exitCode === null && start.signalCode === null) {
    start.kill('SIGINT');
    await new Promise((r) => setTimeout(r, 10_000));
    if (start.exitCode === null) start.kill('SIGKILL');
  }
  for (const pid of pids) if (alive(pid)) process.kill(pid, 'SIGKILL');
});

describe('npm start supervises Parley', () => {
  it('reports a SIGKILLed server, restarts it on /healthz, and stops everything on Ctrl-C', { timeout: 120_000 }, async () => {
    start = spawn(process.execPath, ['scripts/start.mjs'], {
      cwd: path.resolve(import.meta.dirname, '../..'),
      env: { ...process.env, ...ports, PARLEY_DATA_DIR: '.data/test-supervise' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    start.stdout!.on('data', (d: Buffer) => output.push(d.toString()));
    start.stderr!.on('data', (d: Buffer) => output.push(d.toString()));

    await waitForLine(/ready in [\d.]+ s/, 90_000);
    expect(await healthy()).toBe(true);
    const first = listener(ports.PORT)!;
    expect(first).toBeGreaterThan(0);
    pids.push(first);

    process.kill(first, 'SIGKILL');
    await waitForLine(/Parley was killed by SIGKILL; restarting it \(1 of 3 within 60 s\)/, 10_000);
    const back = await waitForLine(/Parley is back \(pid (\d+)\)/, 30_000);
    const second = Number(back[1]);
    pids.push(second);
    expect(second).not.toBe(first);
    expect(alive(first)).toBe(false);
    expect(await healthy()).toBe(true);
    expect(listener(ports.PORT)).toBe(second);

    // Ctrl-C: npm start stops Parley (no restart), maildev and MariaDB, and exits 0.
    const exited = new Promise<number | null>((r) => start!.once('exit', (code) => r(code)));
    start.kill('SIGINT');
    expect(await exited).toBe(0);
    expect(alive(second)).toBe(false);
    expect(await healthy()).toBe(false);
    expect(output.join('')).not.toMatch(/restarting it \(2 of 3/);
  });
});
