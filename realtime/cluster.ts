// Cluster mode (REDIS_URL set): several Parley processes behind HAProxy share socket.io's Redis
// adapter, so a broadcast from any process reaches sockets on every process; each live session
// has one owner (realtime/ownership.ts) that alone steps its events. Another process that receives
// an event of that session (a phone that HAProxy sent elsewhere) forwards it to the owner through
// the adapter's serverSideEmit and answers the phone with the owner's answer. Without REDIS_URL
// none of this exists and one process serves everything, as before.
// docs/decisions/032-one-owner-per-session.md has the failure cases.
import { randomBytes } from 'node:crypto';
import os from 'node:os';
import { createAdapter } from '@socket.io/redis-adapter';
import { Redis } from 'ioredis';
import type { Server } from 'socket.io';
import { roomOf } from './engine/engine';
import type { EngineError, EngineEvent } from './engine/types';
import { Membership, memberConnectionName } from './ownership';
import type { Ack, AckData, ClientToServerEvents, InputOf, ServerToClientEvents, SocketData } from './protocol';
import { type ClusterHealth, SessionMoved, type SessionRunner } from './runner';

/** How long an event that reached no owner (the owner just died) waits for the next one. */
export const OWNER_WAIT_MS = 5000;
/** A process that finds it no longer owns a session drops its in-memory copy after this long. */
export const RELEASE_AFTER_MS = 2000;
/** The adapter's bound on one forwarded event (a busy owner queues a thousand choices at once). */
const FORWARD_TIMEOUT_MS = 20_000;
/** How often a forwarded event in flight checks whether its owner is still the owner. */
const OWNER_CHECK_MS = 200;
/**
 * A process whose copy of a session was fenced off (another process took the session over) does
 * not take it back for this long unless its member list changes first: the two disagreed about
 * the members, and the other one's view is usually the newer (it polls every 500 ms).
 */
export const FENCE_BACKOFF_MS = 1500;

/** What the owner of a session runs for another process: the session-side part of each event. */
export interface OwnerOps {
  'session:watch': { input: InputOf<'session:watch'>; out: AckData['session:watch'] };
  'choice:submit': { input: InputOf<'choice:submit'>; out: AckData['choice:submit'] };
  'session:control': { input: InputOf<'session:control'>; out: AckData['session:control'] };
  'participant:act': { input: InputOf<'participant:act'>; out: AckData['participant:act'] };
  /** an engine event from a route (join, open) or a socket's disconnect */
  dispatch: { input: { sessionId: number; event: EngineEvent }; out: { error: EngineError | null } };
}
export type OwnerOp = keyof OwnerOps;

export type OwnerHandlers = { [K in OwnerOp]: (userId: number | null, input: OwnerOps[K]['input']) => Promise<Ack<OwnerOps[K]['out']>> };

export interface ForwardRequest<K extends OwnerOp = OwnerOp> {
  op: K;
  sessionId: number;
  /** the member the sender believes owns the session: only it answers */
  to: string;
  userId: number | null;
  input: OwnerOps[K]['input'];
}

/** `owned: false`: this process is not (or no longer) the owner; the sender tries again. */
export type ForwardAnswer = { owned: false } | { owned: true; reply: Ack<OwnerOps[OwnerOp]['out']> };

export interface InterServerEvents {
  'session:forward': (req: ForwardRequest, ack: (answer: ForwardAnswer) => void) => void;
  /** which participants of a session have a socket watching it on the answering process */
  'session:present': (sessionId: number, ack: (participantIds: string[]) => void) => void;
}

export type HubServer = Server<ClientToServerEvents, ServerToClientEvents, InterServerEvents, SocketData>;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

const unavailable = <T>(): Ack<T> => ({ ok: false, code: 'unavailable', message: SessionMoved.message });

export class Cluster {
  readonly id: string;
  readonly membership: Membership;
  private handlers: OwnerHandlers | null = null;
  private releases = new Map<number, NodeJS.Timeout>();
  /** sessions owned again while their copy here waited to be dropped: another owner may have moved them on */
  private stale = new Set<number>();
  /** takeovers in progress, so an event and a rebalance that both find a session new wait for one */
  private taking = new Map<number, Promise<void>>();
  /** sessions whose copy here was fenced off: when, and under which member list */
  private fencedAt = new Map<number, { at: number; version: number }>();
  private closed = false;

  private constructor(
    private io: HubServer,
    private runner: SessionRunner,
    private pub: Redis,
    private sub: Redis,
    private member: Redis,
    id: string,
  ) {
    this.id = id;
    this.membership = new Membership(member, {
      id,
      onChange: (members, previous) => {
        console.log(`[parley] cluster members: ${members.join(', ')} (were ${previous.join(', ')})`);
        this.rebalance().catch((error) => console.error('[parley] rebalance after a membership change failed', error));
      },
    });
  }

  /** Connects to Redis, installs the adapter, joins the members. The hub calls it when REDIS_URL is set. */
  static async start(io: HubServer, runner: SessionRunner, redisUrl: string): Promise<Cluster> {
    const id = `${os.hostname()}-${process.pid}-${randomBytes(3).toString('hex')}`;
    // The adapter's connections wait for Redis however long it is away (commands queue and go out
    // on reconnect): the adapter does not catch a rejected publish, which would crash the process.
    const pub = new Redis(redisUrl, { maxRetriesPerRequest: null });
    const sub = pub.duplicate();
    // The members connection gives up quickly instead: a poll that fails keeps the last list.
    const member = new Redis(redisUrl, { maxRetriesPerRequest: 2, connectionName: memberConnectionName(id) });
    for (const [name, c] of [
      ['pub', pub],
      ['sub', sub],
      ['members', member],
    ] as const) {
      // ioredis reconnects by itself; an unhandled 'error' event would crash the process.
      c.on('error', (error: Error) => console.warn(`[parley] redis (${name}): ${error.message}`));
    }
    io.adapter(createAdapter(pub, sub, { key: 'parley', requestsTimeout: FORWARD_TIMEOUT_MS }));
    const cluster = new Cluster(io, runner, pub, sub, member, id);
    io.on('session:present', (sessionId, ack) => ack(cluster.localPlayers(sessionId)));
    io.on('session:forward', (req, ack) => {
      cluster.answer(req).then(ack, (error) => {
        console.error('[parley] forwarded event failed', error);
        ack({ owned: true, reply: { ok: false, code: 'server-error', message: 'Something went wrong on the server.' } });
      });
    });
    runner.setOwnership({
      owns: (sessionId) => cluster.membership.owns(sessionId),
      dispatchAtOwner: async (sessionId, event, userId) => {
        const reply = await cluster.atOwner('dispatch', sessionId, userId, { sessionId, event });
        if (reply.ok) return reply.data;
        throw new Error(`${reply.code}: ${reply.message}`);
      },
      fenced: (sessionId) => cluster.fenced(sessionId),
      health: () => cluster.health(),
    });
    await cluster.membership.join();
    return cluster;
  }

  /** The session-side part of each event, run here when this process owns the session (hub.ts). */
  serve(handlers: OwnerHandlers) {
    this.handlers = handlers;
  }

  /**
   * Runs an event's session-side part on the session's owner: here when this process owns it,
   * else through the adapter. An event that reaches no owner (the owner just died and is still
   * listed, or two processes disagree for a moment about the members) is sent again until
   * OWNER_WAIT_MS has passed; then the answer is 'unavailable' and the phone tries again.
   */
  async atOwner<K extends OwnerOp>(
    op: K,
    sessionId: number,
    userId: number | null,
    input: OwnerOps[K]['input'],
  ): Promise<Ack<OwnerOps[K]['out']>> {
    const handlers = this.handlers;
    if (!handlers) return unavailable();
    const until = Date.now() + OWNER_WAIT_MS;
    for (;;) {
      const owner = this.membership.owner(sessionId);
      if (owner === this.id) {
        if (await this.ensureHeld(sessionId)) return handlers[op](userId, input);
      } else if (owner) {
        const req: ForwardRequest<K> = { op, sessionId, to: owner, userId, input };
        const answer = await this.send(req, owner);
        if (answer?.owned) return this.narrow(op, answer.reply);
      }
      if (this.closed || Date.now() >= until) return unavailable();
      await sleep(OWNER_CHECK_MS);
    }
  }

  /**
   * The reply to a forwarded `op` is that op's answer: the owner ran handlers[op] for it. The
   * wire type cannot say which op a reply belongs to, so it is told here, once.
   */
  private narrow<K extends OwnerOp>(_op: K, reply: Ack<OwnerOps[OwnerOp]['out']>): Ack<OwnerOps[K]['out']> {
    return reply as Ack<OwnerOps[K]['out']>;
  }

  /** One forward; null when no owner answered or the owner changed (died) while we waited. */
  private send(req: ForwardRequest, owner: string): Promise<ForwardAnswer | null> {
    return new Promise((resolve) => {
      let done = false;
      const finish = (a: ForwardAnswer | null) => {
        if (done) return;
        done = true;
        clearInterval(watch);
        resolve(a);
      };
      const watch = setInterval(() => {
        if (this.closed || this.membership.owner(req.sessionId) !== owner) finish(null);
      }, OWNER_CHECK_MS);
      this.io.serverSideEmit('session:forward', req, (error: Error | null, answers: ForwardAnswer[]) => {
        // Given up already (the owner changed while we waited): nothing to say.
        if (done) return;
        // On a timeout the adapter still hands over the answers that came.
        const owned = (answers ?? []).find((a) => a.owned) ?? null;
        if (error && !owned) console.warn(`[parley] forward of ${req.op} (session ${req.sessionId}): ${error.message}`);
        finish(owned);
      });
    });
  }

  /** On the receiving side: run it when it was meant for us and we own the session. */
  private async answer(req: ForwardRequest): Promise<ForwardAnswer> {
    const handlers = this.handlers;
    if (!handlers || req.to !== this.id || !this.membership.owns(req.sessionId)) return { owned: false };
    if (!(await this.ensureHeld(req.sessionId))) return { owned: false };
    return { owned: true, reply: await this.run(handlers, req) };
  }

  private run<K extends OwnerOp>(handlers: OwnerHandlers, req: ForwardRequest<K>): Promise<Ack<OwnerOps[K]['out']>> {
    return handlers[req.op](req.userId, req.input);
  }

  /**
   * After a membership change: sessions this process now owns and does not hold are rebuilt from
   * MariaDB (with the grace of a restart); sessions it holds and no longer owns are dropped after
   * RELEASE_AFTER_MS (a batch in flight finishes; the new owner's row claim guards the overlap).
   */
  async rebalance(): Promise<number> {
    for (const id of this.runner.heldSessions()) {
      const pending = this.releases.get(id);
      if (this.membership.owns(id)) {
        // Back before the copy was dropped (the owner in between died at once): that owner may
        // have stepped the session, so the copy here is rebuilt, not stepped as it stands.
        if (pending) {
          clearTimeout(pending);
          this.releases.delete(id);
          this.stale.add(id);
        }
        continue;
      }
      if (pending) continue;
      const t = setTimeout(() => {
        this.releases.delete(id);
        if (!this.membership.owns(id)) this.runner.release(id).catch((error) => console.error('[parley] release', error));
      }, RELEASE_AFTER_MS);
      t.unref();
      this.releases.set(id, t);
    }
    const ids = await this.runner.liveSessionIds();
    const taken: number[] = [];
    for (const id of ids) {
      if (!this.membership.owns(id) || (this.runner.holds(id) && !this.stale.has(id))) continue;
      // Counted by the call that starts the takeover (a restarted process rebalances at start-up and
      // again at its first membership change: one takeover, one log line).
      const joining = this.taking.has(id);
      if ((await this.ensureHeld(id)) && !joining) taken.push(id);
    }
    if (taken.length) console.log(`[parley] took over session(s) ${taken.join(', ')}: rebuilt from the database, grace applied`);
    return taken.length;
  }

  /**
   * A session this process owns but does not hold (it was another's a moment ago, or it left
   * memory when it finished) is rebuilt from MariaDB with the grace of a restart before any event
   * of it is stepped here: the rounds nobody could answer while no process stepped it get their
   * full time, and its timers are armed again. Taking the lease fences off any process that still
   * holds an older copy. False: not now — this copy was fenced off a moment ago and the member list
   * has not changed since (the other process probably sees the members better); the event is
   * answered as though no owner were reachable, and the sender tries again. Never throws (a
   * failure is logged; the event that follows loads the session itself).
   */
  async ensureHeld(sessionId: number): Promise<boolean> {
    if (this.runner.holds(sessionId) && !this.stale.has(sessionId)) return true;
    let pending = this.taking.get(sessionId);
    if (!pending) {
      const fenced = this.fencedAt.get(sessionId);
      if (fenced && fenced.version === this.membership.version && Date.now() - fenced.at < FENCE_BACKOFF_MS) return false;
      this.fencedAt.delete(sessionId);
      this.stale.delete(sessionId);
      pending = this.runner
        .takeOver(sessionId)
        .then(() => {
          // Not awaited: the event that caused the takeover need not wait for the other processes.
          void this.markPresent(sessionId);
        })
        .catch((error) => console.error(`[parley] taking over session ${sessionId} failed`, error))
        .finally(() => this.taking.delete(sessionId));
      this.taking.set(sessionId, pending);
    }
    await pending;
    return true;
  }

  /**
   * The runner's copy of a session was fenced off: another process took the session over. It is
   * not taken back at once (see FENCE_BACKOFF_MS); if this process still owns it when the
   * back-off ends, a rebalance takes it then, so its timers are not left unarmed.
   */
  fenced(sessionId: number) {
    console.warn(`[parley] session ${sessionId} was taken over by another process: copy dropped`);
    this.fencedAt.set(sessionId, { at: Date.now(), version: this.membership.version });
    const t = setTimeout(() => {
      if (this.closed) return;
      this.rebalance().catch((error) => console.error('[parley] rebalance after a fence failed', error));
    }, FENCE_BACKOFF_MS + 50);
    t.unref();
  }

  /** Participants with a socket on this process watching `sessionId` (their own rooms). */
  localPlayers(sessionId: number): string[] {
    const prefix = roomOf('participant', String(sessionId), '');
    const ids: string[] = [];
    for (const [room, members] of this.io.of('/').adapter.rooms)
      if (members.size > 0 && room.startsWith(prefix)) ids.push(room.slice(prefix.length));
    return ids;
  }

  /**
   * After a takeover: a copy rebuilt from MariaDB knows nobody's connection (connection states
   * are not stored), and phones on the surviving processes do not ask again, so the Floor would
   * count them as gone. Every process says which participants of the session it has sockets
   * for, and each is marked connected (a `reconnect`, which also sends each its current view).
   */
  private async markPresent(sessionId: number) {
    const remote = await new Promise<string[][]>((resolve) => {
      this.io.serverSideEmit('session:present', sessionId, (error: Error | null, answers: string[][]) => resolve(answers ?? []));
    });
    const ids = new Set([...this.localPlayers(sessionId), ...remote.flat().filter((id) => typeof id === 'string')]);
    await Promise.all(
      [...ids].map((participantId) => this.runner.dispatch(sessionId, { type: 'reconnect', participantId }).catch(() => undefined)),
    );
  }

  /** For /healthz: Redis answers, the adapter is subscribed, who the members are. */
  async health(): Promise<ClusterHealth> {
    let redis = false;
    try {
      // On the members connection, which gives up (the adapter's would queue a PING per probe while Redis is away).
      redis = (await Promise.race([this.member.ping(), sleep(1000).then(() => 'timeout')])) === 'PONG';
    } catch {
      redis = false;
    }
    const adapter = this.sub.status === 'ready' && this.pub.status === 'ready';
    return {
      redis,
      adapter,
      member: this.id,
      members: [...this.membership.members()],
      sessionsHeld: this.runner.heldSessions().filter((id) => this.membership.owns(id)),
    };
  }

  /** Leaves the members at once (a graceful stop): the others take this process's sessions over. */
  async leave() {
    this.closed = true;
    for (const t of this.releases.values()) clearTimeout(t);
    await this.membership.leave();
  }

  /** After io.close(): the Redis connections, politely (QUIT) when Redis answers within a second. */
  async close() {
    await this.leave();
    await Promise.all(
      [this.member, this.pub, this.sub].map((c) =>
        Promise.race([c.quit().catch(() => undefined), sleep(1000)]).finally(() => c.disconnect()),
      ),
    );
  }
}
