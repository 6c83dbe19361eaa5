// `npm run bench:live -- --n 50 --supergames 2 [--sessions K] [--delta 0.75] [--json out.json]`:
// a lecture hall against the production server, with the floor of this machine measured in the
// same run. Starts (or reuses) the private test MariaDB (PARLEY_TEST_DB_PORT, default 3317) with
// its own database `parley_bench_live`, maildev and the production server on their own ports
// (PARLEY_BENCH_PORT 3191, PARLEY_BENCH_SMTP_PORT 1027, PARLEY_BENCH_MAIL_WEB_PORT 1082) with the
// sign-in limits raised through the environment only, and a bare socket.io echo server; then
// runs the load generator (scripts/bench-live.ts) in its own process. Stops what it started.
// `--instances n`: cluster mode instead — a private Redis (PARLEY_BENCH_REDIS_PORT, 6382), n
// processes on the ports after PARLEY_BENCH_PORT and HAProxy on PARLEY_BENCH_PORT (the phones go
// through HAProxy); CPU and memory are summed over the n processes. Each run's figures are kept in
// .data/bench-live/instances-<n>.json, and the ratio of 2 processes to 1 is printed when both exist.
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import readline from 'node:readline';
import {
  MARIADB_PACKAGES,
  ensureBuild,
  ensureDebian,
  ensureNodeModules,
  fail,
  keep,
  root,
  runTs,
  say,
  startMaildev,
  startMariadb,
  stopAll,
  stopOnSignals,
  waitForHttp,
} from './lib/services.mjs';
import { appEnv } from './lib/app-env.mjs';
import { HAPROXY_PACKAGES, REDIS_PACKAGES, clusterProcessEnv, startHaproxy, startRedis } from './lib/cluster.mjs';

const port = Number(process.env.PARLEY_BENCH_PORT ?? 3191);
const dbPort = Number(process.env.PARLEY_TEST_DB_PORT ?? 3317);
const smtpPort = Number(process.env.PARLEY_BENCH_SMTP_PORT ?? 1027);
const mailWebPort = Number(process.env.PARLEY_BENCH_MAIL_WEB_PORT ?? 1082);
const dataDir = path.join(root, '.data/test');
const logDir = path.join(root, '.data/bench-live');
const instArg = process.argv.indexOf('--instances');
/** null: one process as before (no Redis, no HAProxy); n: cluster mode with n processes */
const instances = instArg > 0 ? Number(process.argv[instArg + 1]) : null;
if (instances !== null && !(Number.isInteger(instances) && instances >= 1 && instances <= 8)) {
  console.error('[bench:live] --instances must be a whole number from 1 to 8');
  process.exit(1);
}
const redisPort = Number(process.env.PARLEY_BENCH_REDIS_PORT ?? 6382);
const genArgs = process.argv.slice(2).filter((a, i, all) => a !== '--instances' && all[i - 1] !== '--instances');

if (process.argv.includes('--help')) {
  process.exit(runTs('scripts/bench-live.ts', ['--help'], {}) ? 0 : 1);
}

stopOnSignals();
ensureNodeModules();
ensureDebian(instances === null ? [MARIADB_PACKAGES] : [MARIADB_PACKAGES, REDIS_PACKAGES, HAPROXY_PACKAGES]);
fs.mkdirSync(logDir, { recursive: true });
await startMariadb({
  dir: dataDir,
  port: dbPort,
  databases: ['parley_bench_live'],
  fresh: ['parley_bench_live'],
  user: 'parley',
  password: 'parley',
});
const env = appEnv({
  port,
  dbPort,
  database: 'parley_bench_live',
  smtpPort,
  dataDir,
  extra: {
    ADMIN_EMAILS: '',
    // The benchmark's instructor creates its course through the real page.
    INSTRUCTOR_DOMAINS: 'bench.parley.test',
    // A whole lecture hall signs in from 127.0.0.1 within minutes, run after run: for the benchmark
    // only, the per-network code limit and the roster mail cap are lifted.
    CODE_REQUESTS_PER_IP: '1000000',
    INVITES_PER_COURSE_PER_DAY: '1000000',
  },
});
if (!runTs('scripts/migrate.ts', [], env)) fail('migrations failed', 'See the output above.');
await startMaildev({ smtp: smtpPort, web: mailWebPort });
ensureBuild(env);

// PARLEY_BENCH_PROFILE=<folder>: the server writes a V8 CPU profile there when it stops (open it in
// Chromium's DevTools, Performance tab) — where a slow run spends its time.
const profile = process.env.PARLEY_BENCH_PROFILE ? ['--cpu-prof', '--cpu-prof-dir', path.resolve(process.env.PARLEY_BENCH_PROFILE)] : [];
const appPorts = instances === null ? [port] : Array.from({ length: instances }, (_, i) => port + 1 + i);
if (instances !== null) {
  try {
    keep('Redis (bench)', (await startRedis({ dir: path.join(logDir, 'redis'), port: redisPort })).child);
  } catch (error) {
    fail(`Redis could not start: ${error instanceof Error ? error.message : String(error)}`);
  }
}
const servers = appPorts.map((p, i) => {
  const serverLog = fs.createWriteStream(path.join(logDir, instances === null ? 'server.log' : `server-${i + 1}.log`));
  const own = instances === null ? env : { ...env, ...clusterProcessEnv({ redisPort, proxyPort: port, port: p, jobs: i === 0 }) };
  const server = keep(
    `Parley (bench${instances === null ? '' : ` ${i + 1}`})`,
    spawn(process.execPath, [...profile, '--import', 'tsx', 'server.ts'], {
      cwd: root,
      env: { ...process.env, ...own },
      stdio: ['ignore', 'pipe', 'pipe'],
    }),
  );
  server.stdout.pipe(serverLog);
  server.stderr.pipe(serverLog);
  return server;
});
for (const [i, server] of servers.entries()) {
  if (!(await waitForHttp(`http://127.0.0.1:${appPorts[i]}/healthz`, 90_000, server))) {
    fail(`the benchmark server did not answer on port ${appPorts[i]}`, `Its log is in ${path.relative(root, logDir)}`);
  }
}
if (instances !== null) {
  try {
    keep('HAProxy (bench)', (await startHaproxy({ dir: path.join(logDir, 'haproxy'), port, backends: appPorts })).child);
  } catch (error) {
    fail(`HAProxy could not start: ${error instanceof Error ? error.message : String(error)}`);
  }
  if (!(await waitForHttp(`http://127.0.0.1:${port}/healthz`, 30_000))) fail(`HAProxy did not answer on port ${port}`);
}

const echo = keep(
  'socket.io echo',
  spawn(process.execPath, [path.join(root, 'scripts/bench-echo.mjs')], { cwd: root, stdio: ['ignore', 'pipe', 'inherit'] }),
);
const echoPort = await new Promise((resolve) => {
  const t = setTimeout(() => resolve(null), 15_000);
  readline.createInterface({ input: echo.stdout }).on('line', (l) => {
    const m = /^echo-port (\d+)$/.exec(l);
    if (m) {
      clearTimeout(t);
      resolve(Number(m[1]));
    }
  });
});
if (!echoPort) fail('the echo server did not start');

say(
  `server pid(s) ${servers.map((s) => s.pid).join(', ')} on ${appPorts.join(', ')}${instances === null ? '' : ` behind HAProxy on ${port}`}; echo on ${echoPort}; running the load generator`,
);
const gen = spawn(process.execPath, ['--import', 'tsx', 'scripts/bench-live.ts', ...genArgs], {
  cwd: root,
  env: {
    ...process.env,
    DATABASE_URL: env.DATABASE_URL,
    BENCH_URL: `http://127.0.0.1:${port}`,
    BENCH_MAIL_API: `http://127.0.0.1:${mailWebPort}`,
    BENCH_ECHO_URL: `http://127.0.0.1:${echoPort}`,
    BENCH_SERVER_PID: servers.map((s) => s.pid).join(','),
    BENCH_INSTANCES: instances === null ? '' : String(instances),
    BENCH_RESULTS_DIR: logDir,
  },
  stdio: 'inherit',
});
const code = await new Promise((resolve) => gen.on('exit', (c, sig) => resolve(c ?? (sig ? 1 : 0))));
const died = servers.some((server) => server.exitCode !== null || server.signalCode !== null);
await stopAll();
if (died) fail('a Parley server died during the benchmark', `Its log is in ${path.relative(root, logDir)}`);
if (code !== 0)
  fail(
    'the live benchmark did not complete',
    `See the output above; the server's log is ${path.relative(root, path.join(logDir, 'server.log'))}`,
  );
