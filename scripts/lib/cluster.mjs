// Cluster mode's local services (docs/deploy.md, docs/decisions/032-one-owner-per-session.md):
// a private Redis (Debian's redis-server) for socket.io's adapter and the member list, and HAProxy
// (Debian's haproxy) in front of n Parley processes — both on loopback, files in a data folder,
// never the system services. Shared by `npm run start:cluster`, the cluster tests and
// `npm run bench:live -- --instances n`. Plain Node, like services.mjs.
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';

export const REDIS_PACKAGES = { bin: 'redis-server', packages: ['redis-server'] };
export const HAPROXY_PACKAGES = { bin: 'haproxy', packages: ['haproxy'] };

const sleep = (ms) => new Promise((r) => setTimeout(r, ms));

function which(bin) {
  for (const dir of [...(process.env.PATH ?? '').split(':'), '/usr/sbin', '/usr/bin', '/sbin']) {
    const p = path.join(dir, bin);
    if (dir && fs.existsSync(p)) return p;
  }
  return bin;
}

/** Whether something accepts TCP connections on 127.0.0.1:port. */
export function listening(port) {
  return new Promise((resolve) => {
    const s = net.connect({ port, host: '127.0.0.1' });
    s.once('connect', () => {
      s.destroy();
      resolve(true);
    });
    s.once('error', () => resolve(false));
  });
}

/** One Redis command over a fresh connection (inline protocol); resolves with the first reply line, or null. */
export function redisCommand(port, command, timeoutMs = 1000) {
  return new Promise((resolve) => {
    const s = net.connect({ port, host: '127.0.0.1' });
    let buf = '';
    const done = (v) => {
      clearTimeout(t);
      s.destroy();
      resolve(v);
    };
    const t = setTimeout(() => done(null), timeoutMs);
    s.once('connect', () => s.write(`${command}\r\n`));
    s.on('data', (d) => {
      buf += d.toString();
      if (buf.includes('\r\n')) done(buf.split('\r\n')[0]);
    });
    s.once('error', () => done(null));
  });
}

/**
 * A private redis-server on 127.0.0.1:`port`, files in `dir`. No persistence: what Redis holds
 * (the member list, the adapter's channels) is rebuilt by the processes within a second of a
 * restart. Resolves with `{ child, stop() }` once it answers PING.
 */
export async function startRedis({ dir, port }) {
  fs.mkdirSync(dir, { recursive: true });
  if (await listening(port)) throw new Error(`port ${port} on 127.0.0.1 is taken, so Redis cannot start there`);
  const child = spawn(
    which('redis-server'),
    [
      '--port',
      String(port),
      '--bind',
      '127.0.0.1',
      '--protected-mode',
      'yes',
      '--dir',
      dir,
      '--save',
      '',
      '--appendonly',
      'no',
      '--daemonize',
      'no',
      '--logfile',
      path.join(dir, 'redis.log'),
      '--pidfile',
      path.join(dir, 'redis.pid'),
    ],
    { detached: true, stdio: 'ignore' },
  );
  for (let i = 0; i < 100; i++) {
    if ((await redisCommand(port, 'PING')) === '+PONG') break;
    if (child.exitCode !== null) break;
    await sleep(100);
  }
  if ((await redisCommand(port, 'PING')) !== '+PONG') {
    child.kill('SIGKILL');
    const log = path.join(dir, 'redis.log');
    const tail = fs.existsSync(log) ? fs.readFileSync(log, 'utf8').split('\n').slice(-6).join('\n') : '';
    throw new Error(`redis-server did not start on port ${port}\n${tail}`);
  }
  return { child, stop: () => stopChild(child) };
}

/** The HAProxy configuration for `backends` (ports on 127.0.0.1) behind 127.0.0.1:`port`. */
export function haproxyConfig({ port, backends, dir }) {
  return `# Made by scripts/lib/cluster.mjs; rewritten at every start.
global
  # Each connection needs two file descriptors; 9,000 fits the usual 20,000 limit of a shell.
  maxconn 9000
  pidfile ${path.join(dir, 'haproxy.pid')}

defaults
  mode http
  # The client's address for Parley's rate limits (the processes run with TRUST_PROXY=1).
  option forwardfor
  # Every retry of a connection that found a dead process goes to another one (by default only
  # the last of the retries does, after a second of waiting between them).
  option redispatch 1
  retries 3
  # A request (a websocket upgrade included) that found a dead process goes to another one.
  retry-on conn-failure empty-response response-timeout 502 503 504
  timeout connect 2s
  timeout client 60s
  timeout server 60s
  timeout http-request 10s
  # A websocket is a tunnel once upgraded: phones stay connected for a whole session.
  timeout tunnel 2h
  timeout client-fin 5s

frontend parley
  bind 127.0.0.1:${port}
  default_backend parley

backend parley
  # The process with the fewest connections gets a new one; a browser that starts on long-polling
  # keeps its process through the cookie (socket.io's polling needs one process per handshake).
  balance leastconn
  cookie parley-node insert indirect nocache attr "HttpOnly" attr "SameSite=Lax"
  option httpchk
  http-check send meth GET uri /healthz ver HTTP/1.1 hdr Host 127.0.0.1
  http-check expect status 200
  # A process under load may answer /healthz slowly: down after 3 checks of 2 s unanswered for 5 s
  # each. A killed process is noticed sooner anyway: its connections are refused and retried elsewhere.
  timeout check 5s
  default-server inter 2s fastinter 1s downinter 1s fall 3 rise 2 on-marked-down shutdown-sessions
${backends.map((p, i) => `  server p${i + 1} 127.0.0.1:${p} check cookie p${i + 1}`).join('\n')}
`;
}

/** HAProxy (Debian's) with the configuration above, written into `dir`. Resolves once it listens. */
export async function startHaproxy({ dir, port, backends }) {
  fs.mkdirSync(dir, { recursive: true });
  if (await listening(port)) throw new Error(`port ${port} on 127.0.0.1 is taken, so HAProxy cannot start there`);
  const cfg = path.join(dir, 'haproxy.cfg');
  fs.writeFileSync(cfg, haproxyConfig({ port, backends, dir }));
  const check = spawnSync(which('haproxy'), ['-c', '-f', cfg], { encoding: 'utf8' });
  if (check.status !== 0) throw new Error(`haproxy rejected ${cfg}:\n${check.stderr || check.stdout}`);
  // -db: stay in the foreground (no daemon), so the child is HAProxy itself and stops with us.
  const child = spawn(which('haproxy'), ['-db', '-f', cfg], { detached: true, stdio: ['ignore', 'ignore', 'pipe'] });
  const log = fs.createWriteStream(path.join(dir, 'haproxy.log'));
  child.stderr.pipe(log);
  for (let i = 0; i < 100 && !(await listening(port)); i++) {
    if (child.exitCode !== null) throw new Error(`haproxy exited at start (code ${child.exitCode}); see ${path.join(dir, 'haproxy.log')}`);
    await sleep(100);
  }
  if (!(await listening(port))) throw new Error(`haproxy did not listen on ${port}`);
  return { child, stop: () => stopChild(child) };
}

/** SIGTERM, then SIGKILL after 5 s; resolves when the process is gone. */
export async function stopChild(child) {
  if (child.exitCode !== null || child.signalCode !== null) return;
  child.kill('SIGTERM');
  const until = Date.now() + 5000;
  while (child.exitCode === null && child.signalCode === null && Date.now() < until) await sleep(50);
  if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
  while (child.exitCode === null && child.signalCode === null) await sleep(20);
}

/** The environment of one Parley process of a cluster (on top of the single-process one). */
export function clusterProcessEnv({ redisPort, proxyPort, port, jobs = true }) {
  return {
    PORT: String(port),
    REDIS_URL: `redis://127.0.0.1:${redisPort}`,
    // Links and the Origin check name the address people use: HAProxy's.
    APP_URL: `http://127.0.0.1:${proxyPort}`,
    TRUST_PROXY: '1',
    PARLEY_JOBS: jobs ? 'on' : 'off',
  };
}
