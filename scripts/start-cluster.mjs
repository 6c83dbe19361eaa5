// `npm run start:cluster` (or `PARLEY_INSTANCES=n npm start`): what `npm start` sets up, plus a
// private Redis and HAProxy (Debian's packages, on loopback, files in the data folder), then n
// Parley processes in cluster mode on their own ports with HAProxy on PORT in front
// (docs/deploy.md, docs/decisions/032-one-owner-per-session.md). Each process is supervised like
// `npm start`'s one; every process takes background jobs (they are leased in MariaDB, so a job
// runs once whichever process takes it). Ctrl-C stops all of it.
import path from 'node:path';
import { HAPROXY_PACKAGES, REDIS_PACKAGES, clusterProcessEnv, startHaproxy, startRedis } from './lib/cluster.mjs';
import { prepareLocalStack, superviseParley } from './lib/local-stack.mjs';
import { fail, keep, root, say, stopOnSignals, waitForHttp } from './lib/services.mjs';

const arg = process.argv.indexOf('--instances');
const instances = Number(arg > 0 ? process.argv[arg + 1] : (process.env.PARLEY_INSTANCES ?? 2));
if (!Number.isInteger(instances) || instances < 1 || instances > 16) {
  console.error('[parley] PARLEY_INSTANCES (or --instances) must be a whole number from 1 to 16');
  process.exit(1);
}
const port = Number(process.env.PORT ?? 3000);
const dbPort = Number(process.env.PARLEY_DB_PORT ?? 3307);
const redisPort = Number(process.env.PARLEY_REDIS_PORT ?? 6380);
const smtpPort = Number(process.env.PARLEY_SMTP_PORT ?? 1025);
const mailWebPort = Number(process.env.PARLEY_MAIL_WEB_PORT ?? 1080);
/** the processes listen on PORT+1 … PORT+n, HAProxy on PORT */
const appPorts = Array.from({ length: instances }, (_, i) => port + 1 + i);
const dataDir = process.env.PARLEY_DATA_DIR ? path.resolve(process.env.PARLEY_DATA_DIR) : path.join(root, '.data/dev');

stopOnSignals();
const t0 = Date.now();
const env = await prepareLocalStack({ dataDir, dbPort, smtpPort, mailWebPort, packages: [REDIS_PACKAGES, HAPROXY_PACKAGES] });

try {
  const redis = await startRedis({ dir: path.join(dataDir, 'redis'), port: redisPort });
  keep('Redis', redis.child);
} catch (error) {
  fail(
    `Redis could not start: ${error instanceof Error ? error.message : String(error)}`,
    `Another port: PARLEY_REDIS_PORT=6390 npm run start:cluster`,
  );
}

const supervisors = appPorts.map((p, i) => {
  const own = { ...env, ...clusterProcessEnv({ redisPort, proxyPort: port, port: p }) };
  if (process.env.APP_URL) own.APP_URL = process.env.APP_URL;
  const { supervisor, healthz } = superviseParley({
    name: `Parley ${i + 1}`,
    env: own,
    port: p,
    back: (pid) => `Parley ${i + 1} is back (pid ${pid}) on port ${p}; it takes its share of live sessions again`,
  });
  return { s: supervisor, healthz, port: p };
});
for (const { s, healthz, port: p } of supervisors) {
  if (!(await waitForHttp(healthz, 90_000, s.child))) fail(`Parley did not answer on port ${p}`, `Are ports ${appPorts.join(', ')} free?`);
}
try {
  const proxy = await startHaproxy({ dir: path.join(dataDir, 'haproxy'), port, backends: appPorts });
  keep('HAProxy', proxy.child);
} catch (error) {
  fail(
    `HAProxy could not start: ${error instanceof Error ? error.message : String(error)}`,
    `Another port: PORT=3001 npm run start:cluster`,
  );
}
if (!(await waitForHttp(`http://127.0.0.1:${port}/healthz`, 30_000))) fail(`HAProxy did not answer on port ${port}`);
say(
  `ready in ${((Date.now() - t0) / 1000).toFixed(1)} s: ${instances} Parley processes (pids ${supervisors.map((x) => x.s.child.pid).join(', ')})`,
);
console.log(`
  Parley          http://127.0.0.1:${port}   (HAProxy: leastconn over ${instances} processes)
  Processes       ${appPorts.map((p) => `http://127.0.0.1:${p}`).join('  ')}   (each: /healthz shows its cluster view)
  Redis           127.0.0.1:${redisPort}   (socket.io adapter and the member list; no persistence)
  Mail catcher    http://127.0.0.1:${mailWebPort}
  MariaDB         127.0.0.1:${dbPort}, data in ${path.relative(root, dataDir) || '.'}/mariadb
  HAProxy config  ${path.relative(root, path.join(dataDir, 'haproxy', 'haproxy.cfg'))}

  Ctrl-C stops Parley, HAProxy, Redis, maildev and MariaDB.
`);
