// Local services for `npm start` and `npm test`: npm packages, Debian packages, a private MariaDB,
// maildev. Plain Node (no TypeScript, no dependencies) because it runs before `npm ci` has.
import { spawn, spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

const started = [];

export function say(line) {
  process.stdout.write(`[parley] ${line}\n`);
}

/** What fail() throws so that nothing after it runs; never caught by our scripts, only ignored. */
export class Stopping extends Error {
  name = 'Stopping';
}

let failed = false;

/**
 * Says what went wrong, stops what was started (then exits 1), and throws `Stopping`, so nothing
 * after the call runs — in a plain function, an async one or an event handler alike.
 */
export function fail(message, hint) {
  if (!failed) {
    failed = true;
    process.stderr.write(`\n[parley] ✗ ${message}\n${hint ? `[parley]   ${hint.split('\n').join('\n[parley]   ')}\n` : ''}`);
    // Our own throw reaches the top as an uncaught exception (or a rejection of top-level await):
    // expected, so it is not printed; the exit waits for stopAll().
    const quiet = (error) => {
      if (!(error instanceof Stopping)) console.error(error);
    };
    process.on('uncaughtException', quiet);
    process.on('unhandledRejection', quiet);
    stopAll().finally(() => process.exit(1));
  }
  throw new Stopping(message);
}

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: 'inherit', cwd: root, ...opts });
  return r.status === 0;
}

/** Types (React Router typegen + tsc), ESLint and Prettier's check, as `npm run check` runs them. */
export function runChecks() {
  const bin = (name) => path.join(root, 'node_modules/.bin', name);
  return (
    run(bin('react-router'), ['typegen']) &&
    run(bin('tsc'), ['--noEmit']) &&
    run(bin('eslint'), ['--max-warnings=0', '.']) &&
    run(bin('prettier'), ['--check', '--log-level=warn', '.'])
  );
}

function which(bin) {
  for (const dir of [...(process.env.PATH ?? '').split(':'), '/usr/sbin', '/usr/bin', '/sbin']) {
    const p = path.join(dir, bin);
    if (dir && fs.existsSync(p)) return p;
  }
  return null;
}

/** npm packages: `npm ci` when node_modules is missing or older than the lock file. */
export function ensureNodeModules() {
  const marker = path.join(root, 'node_modules', '.package-lock.json');
  const lock = path.join(root, 'package-lock.json');
  if (fs.existsSync(marker) && fs.statSync(marker).mtimeMs >= fs.statSync(lock).mtimeMs) return;
  say('installing npm packages (npm ci)…');
  if (!run('npm', ['ci', '--no-audit', '--no-fund'])) fail('npm ci failed', 'See the npm output above.');
}

/** Debian packages, installed when a binary is missing and we are root; else the exact command. */
export function ensureDebian(needs) {
  const missing = needs.filter((n) => !which(n.bin));
  if (missing.length === 0) return;
  const pkgs = [...new Set(missing.flatMap((n) => n.packages))];
  // Waits for dpkg's lock (unattended upgrades, another checkout's `npm test` installing the same
  // packages) instead of failing at once.
  const wait = '-o DPkg::Lock::Timeout=600';
  const cmd = `apt-get ${wait} update && DEBIAN_FRONTEND=noninteractive apt-get ${wait} install -y --no-install-recommends ${pkgs.join(' ')}`;
  if (process.getuid?.() !== 0) {
    fail(
      `missing ${missing.map((n) => n.bin).join(', ')}`,
      `Install Debian's packages as root, then run this again:\n  sudo sh -c '${cmd}'`,
    );
  }
  say(`installing Debian packages: ${pkgs.join(' ')}…`);
  // flock: two of our own scripts starting at once take turns (apt-get update's list lock does not wait).
  if (!run('flock', ['/tmp/parley-apt.lock', 'sh', '-c', cmd], { env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })) {
    fail('apt-get could not install the packages', `Run by hand and read its error:\n  ${cmd}`);
  }
}

export const MARIADB_PACKAGES = { bin: 'mariadbd', packages: ['mariadb-server-core', 'mariadb-client'] };
export const CHROMIUM_PACKAGES = { bin: 'chromium', packages: ['chromium', 'fonts-dejavu-core'] };
/** `ss`, with which the supervision test finds the server's process as an operator would */
export const IPROUTE_PACKAGES = { bin: 'ss', packages: ['iproute2'] };

export function portIsFree(port, host = '127.0.0.1') {
  return new Promise((resolve) => {
    const srv = net.createServer();
    srv.once('error', () => resolve(false));
    srv.listen(port, host, () => srv.close(() => resolve(true)));
  });
}

const sleep = (ms) => new Promise((r) => setTimeout(r, ms));

function alive(pid) {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/** Secrets for a local instance, made once and kept in its data folder. */
export function localSecrets(dir) {
  const file = path.join(dir, 'secrets.json');
  if (fs.existsSync(file)) return JSON.parse(fs.readFileSync(file, 'utf8'));
  const secrets = { SESSION_SECRET: randomBytes(32).toString('hex'), TOTP_SECRET: randomBytes(32).toString('hex') };
  fs.mkdirSync(dir, { recursive: true });
  fs.writeFileSync(file, JSON.stringify(secrets, null, 2), { mode: 0o600 });
  return secrets;
}

/**
 * A private MariaDB on 127.0.0.1 with its data under `dir` — never the system service.
 * Reuses an instance this project left running in the same folder.
 */
export async function startMariadb({ dir, port, databases, user, password, fresh = [] }) {
  const datadir = path.join(dir, 'mariadb');
  const sock = path.join(datadir, 'mariadb.sock');
  const pidFile = path.join(datadir, 'mariadb.pid');
  const client = (sql) =>
    spawnSync(which('mariadb') ?? 'mariadb', ['--no-defaults', `--socket=${sock}`, '-uroot', '-e', sql], { encoding: 'utf8' });
  const ping = () =>
    spawnSync(which('mariadb-admin') ?? 'mariadb-admin', ['--no-defaults', `--socket=${sock}`, '-uroot', 'ping'], { encoding: 'utf8' })
      .status === 0;

  let reused = false;
  const oldPid = fs.existsSync(pidFile) ? Number(fs.readFileSync(pidFile, 'utf8').trim()) : 0;
  if (oldPid && alive(oldPid) && ping()) {
    // One data folder, one server: a MariaDB left running from this folder on another port
    // cannot be reused (the app would connect to `port` and find nothing) nor joined by a second.
    const running = Number(client('SELECT @@port').stdout?.match(/\d+\s*$/)?.[0]);
    if (running !== port) {
      fail(
        `MariaDB is already running from ${path.relative(root, datadir)} (pid ${oldPid}) on port ${running}, not on port ${port} as asked`,
        `Use its port (PARLEY_DB_PORT=${running} for npm start, PARLEY_TEST_DB_PORT=${running} for npm test), or stop it first:\n  mariadb-admin --no-defaults --socket=${sock} -uroot shutdown`,
      );
    }
    reused = true;
    say(`MariaDB already running from ${path.relative(root, datadir)} on port ${port} (pid ${oldPid}); reusing it`);
  } else {
    if (!isInitialised(datadir)) await initialise(datadir);
    if (!(await portIsFree(port))) {
      fail(
        `port ${port} on 127.0.0.1 is taken, so Parley's MariaDB cannot start`,
        `Stop whatever listens there (ss -ltnp 'sport = :${port}'), or pick another port:\n  PARLEY_DB_PORT=3407 npm start`,
      );
    }
    const errLog = path.join(datadir, 'error.log');
    const child = spawn(
      which('mariadbd') ?? 'mariadbd',
      [
        '--no-defaults',
        `--datadir=${datadir}`,
        `--socket=${sock}`,
        `--port=${port}`,
        '--bind-address=127.0.0.1',
        `--pid-file=${pidFile}`,
        `--log-error=${errLog}`,
        '--user=root',
        '--skip-name-resolve',
        '--character-set-server=utf8mb4',
        '--collation-server=utf8mb4_unicode_ci',
        '--max-connections=500',
        '--innodb-flush-log-at-trx-commit=1',
      ],
      { detached: true, stdio: 'ignore' },
    );
    started.push({
      name: 'MariaDB',
      child,
      stop: () => spawnSync('mariadb-admin', ['--no-defaults', `--socket=${sock}`, '-uroot', 'shutdown']),
    });
    let ready = false;
    for (let i = 0; i < 300 && !ready; i++) {
      await sleep(100);
      if (child.exitCode !== null) break;
      ready = ping();
    }
    if (!ready) {
      const tail = fs.existsSync(errLog) ? fs.readFileSync(errLog, 'utf8').split('\n').slice(-8).join('\n') : '';
      fail('MariaDB did not start', `Its log (${path.relative(root, errLog)}) ends with:\n${tail}`);
    }
  }
  const sql = [
    ...fresh.map((db) => `DROP DATABASE IF EXISTS \`${db}\`;`),
    ...databases.map((db) => `CREATE DATABASE IF NOT EXISTS \`${db}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`),
    `CREATE USER IF NOT EXISTS '${user}'@'127.0.0.1' IDENTIFIED BY '${password}';`,
    `CREATE USER IF NOT EXISTS '${user}'@'localhost' IDENTIFIED BY '${password}';`,
    ...databases.flatMap((db) => [
      `GRANT ALL PRIVILEGES ON \`${db}\`.* TO '${user}'@'127.0.0.1';`,
      `GRANT ALL PRIVILEGES ON \`${db}\`.* TO '${user}'@'localhost';`,
    ]),
  ].join(' ');
  const r = client(sql);
  if (r.status !== 0) fail('could not create the database and its user', r.stderr);
  return { sock, reused };
}

/** Written into a data folder once mariadb-install-db has finished in it. */
const READY = 'parley-initialised';
const SYSTEM_SCHEMAS = new Set(['mysql', 'performance_schema', 'sys']);

/**
 * A folder is whole when it carries our marker; folders made before the marker existed count as
 * whole when the system schema was installed to its end (`sys` comes last) or they hold a
 * database of their own — never throw away a folder that may hold someone's data.
 */
function isInitialised(datadir) {
  if (!fs.existsSync(datadir)) return false;
  if (fs.existsSync(path.join(datadir, READY))) return true;
  const entries = fs.readdirSync(datadir, { withFileTypes: true });
  const whole =
    (fs.existsSync(path.join(datadir, 'mysql', 'global_priv.frm')) && fs.existsSync(path.join(datadir, 'sys'))) ||
    entries.some((e) => e.isDirectory() && !SYSTEM_SCHEMAS.has(e.name) && !e.name.startsWith('#'));
  if (whole) fs.writeFileSync(path.join(datadir, READY), 'made by mariadb-install-db\n');
  return whole;
}

/**
 * mariadb-install-db into a side folder, moved into place only once it finished: a first start
 * stopped half-way leaves at most the side folder, which the next start throws away.
 */
async function initialise(datadir) {
  if (fs.existsSync(datadir)) {
    say(`${path.relative(root, datadir)} was left half-made by an earlier start; making it again`);
    fs.rmSync(datadir, { recursive: true, force: true });
  }
  const partial = `${datadir}.partial`;
  fs.rmSync(partial, { recursive: true, force: true });
  fs.mkdirSync(partial, { recursive: true });
  const init = spawnSync(
    which('mariadb-install-db') ?? 'mariadb-install-db',
    ['--no-defaults', `--datadir=${partial}`, '--user=root', '--auth-root-authentication-method=normal', '--skip-test-db'],
    { encoding: 'utf8' },
  );
  if (init.status !== 0) fail('mariadb-install-db could not create the data folder', init.stderr || init.stdout);
  fs.writeFileSync(path.join(partial, READY), 'made by mariadb-install-db\n');
  fs.renameSync(partial, datadir);
}

/** maildev on loopback: catches every e-mail; web page and REST API on `web`. */
export async function startMaildev({ smtp, web }) {
  const health = `http://127.0.0.1:${web}/api/healthz`;
  if (await httpOk(health)) {
    say(`maildev already answers on ${web}; reusing it`);
    return;
  }
  for (const p of [smtp, web]) {
    if (!(await portIsFree(p)))
      fail(`port ${p} is taken, so maildev cannot start`, 'Set PARLEY_SMTP_PORT / PARLEY_MAIL_WEB_PORT to free ports.');
  }
  const child = spawn(
    process.execPath,
    [
      path.join(root, 'node_modules/maildev/dist/bin/maildev.js'),
      '--ip',
      '127.0.0.1',
      '--web-ip',
      '127.0.0.1',
      '--smtp',
      String(smtp),
      '--web',
      String(web),
      '--silent',
    ],
    { detached: true, stdio: 'ignore' },
  );
  started.push({ name: 'maildev', child });
  if (!(await waitForHttp(health, 20_000)))
    fail('maildev did not start', `Try by hand: node node_modules/maildev/dist/bin/maildev.js --smtp ${smtp} --web ${web}`);
}

export async function httpOk(url) {
  try {
    const res = await fetch(url, { signal: AbortSignal.timeout(2000) });
    return res.ok;
  } catch {
    return false;
  }
}

export async function waitForHttp(url, ms, child) {
  const until = Date.now() + ms;
  while (Date.now() < until) {
    if (await httpOk(url)) return true;
    if (child && child.exitCode !== null) return false;
    await sleep(150);
  }
  return false;
}

/** Run a TypeScript file of ours with tsx, synchronously, with the given environment. */
export function runTs(file, args, env) {
  return run(process.execPath, ['--import', 'tsx', file, ...args], { env: { ...process.env, ...env } });
}

export function runBin(bin, args, env) {
  return run(path.join(root, 'node_modules/.bin', bin), args, { env: { ...process.env, ...env } });
}

/** A long-running child that stops with us. */
export function keep(name, child, stop) {
  started.push({ name, child, stop });
  return child;
}

/**
 * A supervised child (supervise.mjs) that stops with us: told to stop first, so that a restart it
 * may have pending never happens, then waited for like any other child.
 */
export function keepSupervised(name, supervisor) {
  started.push({
    name,
    get child() {
      return supervisor.child;
    },
    halt: () => supervisor.stop(),
  });
}

function newestMtime(p) {
  if (!fs.existsSync(p)) return 0;
  const st = fs.statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let max = st.mtimeMs;
  for (const e of fs.readdirSync(p)) max = Math.max(max, newestMtime(path.join(p, e)));
  return max;
}

/** Production build, skipped when nothing it is made from changed since the last one. */
export function ensureBuild(env) {
  const out = path.join(root, 'build/server/index.js');
  const inputs = ['app', 'realtime', 'drizzle', 'public', 'vite.config.ts', 'react-router.config.ts', 'package-lock.json'];
  const newest = Math.max(...inputs.map((p) => newestMtime(path.join(root, p))));
  if (fs.existsSync(out) && fs.statSync(out).mtimeMs > newest) {
    say('build is up to date');
    return;
  }
  say('building the app (react-router build)…');
  if (!runBin('react-router', ['build'], env)) fail('the build failed', 'See the output above.');
}

export async function stopAll() {
  while (started.length) {
    const s = started.pop();
    if (s.halt) await s.halt();
    if (s.child.exitCode !== null || s.child.signalCode !== null) continue;
    if (s.stop) s.stop();
    else s.child.kill('SIGTERM');
    const until = Date.now() + 8000;
    while (s.child.exitCode === null && s.child.signalCode === null && Date.now() < until) await sleep(50);
    if (s.child.exitCode === null && s.child.signalCode === null) s.child.kill('SIGKILL');
  }
}

export function stopOnSignals() {
  let stopping = false;
  for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP']) {
    process.on(sig, () => {
      if (stopping) return;
      stopping = true;
      say('stopping…');
      stopAll().finally(() => process.exit(sig === 'SIGINT' ? 0 : 1));
    });
  }
}
