// A MariaDB of a test's own (a temporary data folder, a free port), started the way `npm start`
// starts Parley's (scripts/lib/services.mjs), for tests that stop, stall or break the database —
// the suite's shared MariaDB must not be touched while other files run against it.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

const services = path.resolve('scripts/lib/services.mjs');

export function freePort(): Promise<number> {
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
export function startMariadbIn(dir: string, port: number, opts: { databases?: string[]; user?: string; password?: string } = {}) {
  const { databases = ['probe'], user = 'probe', password = 'probe' } = opts;
  const script = `import { startMariadb } from ${JSON.stringify(services)};
const r = await startMariadb({ dir: ${JSON.stringify(dir)}, port: ${port}, databases: ${JSON.stringify(databases)}, user: ${JSON.stringify(user)}, password: ${JSON.stringify(password)} });
console.log('RESULT ' + JSON.stringify(r));
process.exit(0);`;
  return spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', timeout: 90_000 });
}

export function tempDir(prefix = 'parley-db-'): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), prefix));
}

/**
 * The pid of the MariaDB running from a data folder (0 when there is none). Never pass 0 to
 * process.kill: it signals the caller's whole process group.
 */
export function mariadbPid(dir: string): number {
  const pidFile = path.join(dir, 'mariadb', 'mariadb.pid');
  const pid = fs.existsSync(pidFile) ? Number(fs.readFileSync(pidFile, 'utf8').trim()) : 0;
  return Number.isInteger(pid) && pid > 0 ? pid : 0;
}

/** Stops the MariaDB of each folder (SIGCONT first, in case a test left it stopped) and removes the folders. */
export function removeMariadbs(dirs: readonly string[]) {
  for (const dir of dirs) {
    const pid = mariadbPid(dir);
    if (!pid) continue;
    try {
      process.kill(pid, 'SIGCONT');
      process.kill(pid, 'SIGTERM');
    } catch {
      // already gone
    }
  }
  // Give the servers a moment to let go of their files before the folders go.
  spawnSync('sleep', ['2']);
  for (const dir of dirs) fs.rmSync(dir, { recursive: true, force: true });
}

/** Applies Parley's migrations to the database at `url` (scripts/migrate.ts). */
export function migrate(url: string) {
  return spawnSync(process.execPath, ['--import', 'tsx', 'scripts/migrate.ts'], {
    encoding: 'utf8',
    env: { ...process.env, DATABASE_URL: url },
    timeout: 60_000,
  });
}
