// A cluster on loopback for the cluster tests: a private Redis, n Parley processes in cluster mode
// (same database and build as the test server) and HAProxy in front, started with the same code as
// `npm run start:cluster` (scripts/lib/cluster.mjs). Ports: PARLEY_TEST_REDIS_PORT for Redis,
// PARLEY_TEST_CLUSTER_PORT for HAProxy and the next n for the processes.
import fs from 'node:fs';
import path from 'node:path';
import { clusterProcessEnv, redisCommand, type Started, startHaproxy, startRedis } from '../../scripts/lib/cluster.mjs';
import { ownerOf } from '#realtime/ownership';
import { SecondServer } from './second-server';

export interface ClusterHealthz {
  ok: boolean;
  redis?: 'up' | 'down';
  adapter?: 'up' | 'down';
  cluster?: { member: string; members: string[]; sessionsHeld: number[] };
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export class TestCluster {
  readonly redisPort = Number(process.env.PARLEY_TEST_REDIS_PORT ?? 6381);
  readonly proxyPort = Number(process.env.PARLEY_TEST_CLUSTER_PORT ?? 3511);
  readonly dir = path.resolve('.data/test/cluster');
  readonly servers: SecondServer[];
  private redis: Started | null = null;
  private proxy: Started | null = null;

  constructor(readonly n = 2) {
    this.servers = Array.from(
      { length: n },
      (_, i) =>
        new SecondServer(
          this.proxyPort + 1 + i,
          // Jobs stay with the test server (a killed process would hold other tests' jobs for a lease).
          clusterProcessEnv({ redisPort: this.redisPort, proxyPort: this.proxyPort, port: this.proxyPort + 1 + i, jobs: false }),
          // A loaded 2-core machine takes a while to start a process; its output is kept for a failure.
          { log: path.join(this.dir, `server-${i + 1}.log`), startMs: 60_000 },
        ),
    );
  }

  /** HAProxy's address: what phones and pages use. */
  get url() {
    return `http://127.0.0.1:${this.proxyPort}`;
  }

  async start() {
    fs.mkdirSync(this.dir, { recursive: true });
    this.redis = await startRedis({ dir: path.join(this.dir, 'redis'), port: this.redisPort });
    await Promise.all(this.servers.map((s) => s.start()));
    this.proxy = await startHaproxy({
      dir: path.join(this.dir, 'haproxy'),
      port: this.proxyPort,
      backends: this.servers.map((s) => s.port),
    });
    await this.untilMembers(this.n);
  }

  async healthz(i: number): Promise<ClusterHealthz> {
    return (await (await fetch(`${this.servers[i].base}/healthz`)).json()) as ClusterHealthz;
  }

  /** Waits until every running process sees exactly `count` members; returns the member ids by server. */
  async untilMembers(count: number, ms = 20_000): Promise<string[]> {
    const until = Date.now() + ms;
    for (;;) {
      const running = this.servers
        .map((s, i) => ({ s, i }))
        .filter(({ s }) => s.process && s.process.exitCode === null && !s.process.signalCode);
      try {
        const seen = await Promise.all(running.map(({ i }) => this.healthz(i)));
        if (seen.every((h) => h.cluster?.members.length === count)) return seen.map((h) => h.cluster!.member);
      } catch {
        // a process not answering yet
      }
      if (Date.now() > until) throw new Error(`the cluster did not settle on ${count} members`);
      await sleep(100);
    }
  }

  /** The index of the server that owns a session now (every running server agrees once settled). */
  async ownerIndex(sessionId: number): Promise<number> {
    const members: string[] = [];
    const ids: (string | null)[] = [];
    for (let i = 0; i < this.servers.length; i++) {
      try {
        const h = await this.healthz(i);
        ids.push(h.cluster!.member);
        if (!members.length) members.push(...h.cluster!.members);
      } catch {
        ids.push(null);
      }
    }
    const owner = ownerOf(sessionId, members);
    return ids.indexOf(owner);
  }

  /** Stops Redis (SIGTERM) and starts it again on the same port, `downMs` later. */
  async restartRedis(downMs = 500) {
    await this.redis?.stop();
    await sleep(downMs);
    this.redis = await startRedis({ dir: path.join(this.dir, 'redis'), port: this.redisPort });
  }

  redisPing() {
    return redisCommand(this.redisPort, 'PING');
  }

  async stop() {
    await Promise.all(this.servers.map((s) => s.kill('SIGTERM')));
    await this.proxy?.stop();
    await this.redis?.stop();
  }
}
