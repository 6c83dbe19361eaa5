// `npm start` / `npm test` start a private MariaDB from a data folder (scripts/lib/services.mjs).
// Two ways it used to trip: a MariaDB already running from the folder on another port was reused
// (then the app could not connect on the port it was given), and a folder left half-made by a
// first start that failed stopped every later start.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { freePort, removeMariadbs, startMariadbIn, tempDir } from '#tests/helpers/private-db';

const dirs: string[] = [];
const startIn = (dir: string, port: number) => startMariadbIn(dir, port);

/** The TCP port the app would connect to answers, with the app user's password. */
function answersOn(port: number) {
  return spawnSync('mariadb', ['--no-defaults', '-h127.0.0.1', `-P${port}`, '-uprobe', '-pprobe', '-N', '-e', 'SELECT @@port'], {
    encoding: 'utf8',
  });
}

function tmp() {
  const dir = tempDir();
  dirs.push(dir);
  return dir;
}

afterAll(() => removeMariadbs(dirs));

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
