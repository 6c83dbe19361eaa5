// `npm start` / `npm test` start a private MariaDB from a data folder (scripts/lib/services.mjs).
// Two ways it used to trip: a MariaDB already running from the folder on another port was reused
// (then the app could not connect on the port it was given), and a folder left half-made by a
// first start that failed stopped every later start.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const services = path.resolve('scripts/lib/services.mjs');
const dirs: string[] = [];

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

/** Runs startMariadb in a child process as the start scripts do; the server it starts outlives it. */
function startIn(dir: string, port: number) {
  const script = `import { startMariadb } from ${JSON.stringify(services)};
const r = await startMariadb({ dir: ${JSON.stringify(dir)}, port: ${port}, databases: ['probe'], user: 'probe', password: 'probe' });
console.log('RESULT ' + JSON.stringify(r));
process.exit(0);`;
  return spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', timeout: 60_000 });
}

/** The TCP port the app would connect to answers, with the app user's password. */
function answersOn(port: number) {
  return spawnSync('mariadb', ['--no-defaults', '-h127.0.0.1', `-P${port}`, '-uprobe', '-pprobe', '-N', '-e', 'SELECT @@port'], { encoding: 'utf8' });
}

function tmp() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'parley-db-'));
  dirs.push(dir);
  return dir;
}

afterAll(() => {
  for (const dir of dirs) {
    const pidFile = path.join(dir, 'mariadb', 'mariadb.pid');
    if (fs.existsSync(pidFile)) {
      try {
        process.kill(Number(fs.readFileSync(pidFile, 'utf8').trim()), 'SIGTERM');
      } catch {
        // already gone
      }
    }
  }
  // Give the servers a moment to let go of their files before the folders go.
  spawnSync('sleep', ['2']);
  for (const dir of dirs) fs.rmSync(dir, { recursive: true, force: true });
});

describe('the private MariaDB of npm start', () => {
  it('refuses to reuse a MariaDB running from the data folder on another port, and says which', { timeout: 90_000 }, async () => {
    const dir = tmp();
    const [first, second] = [await freePort(), await freePort()];
    const a = startIn(dir, first);
    expect(a.status, a.stderr).toBe(0);
    expect(answersOn(first).stdout.trim()).toBe(String(first));

    const b = startIn(dir, second);
    // Before the fix: "already running … reusing it", exit 0, and nothing listens on `second`.
    expect(b.status).not.toBe(0);
    expect(b.stderr).toContain(`port ${first}`);
    expect(b.stderr).toContain(String(second));
  });

  it('makes a half-made data folder again instead of failing on it', { timeout: 90_000 }, async () => {
    const dir = tmp();
    const port = await freePort();
    // What a first start interrupted during mariadb-install-db leaves: the folder and the start
    // of the system schema, without its tables.
    fs.mkdirSync(path.join(dir, 'mariadb', 'mysql'), { recursive: true });
    fs.writeFileSync(path.join(dir, 'mariadb', 'mysql', 'db.opt'), 'default-character-set=utf8mb4\n');

    const r = startIn(dir, port);
    // Before the fix: "MariaDB did not start" (no privilege tables), exit 1.
    expect(r.status, r.stderr).toBe(0);
    expect(answersOn(port).stdout.trim()).toBe(String(port));
  });
});
