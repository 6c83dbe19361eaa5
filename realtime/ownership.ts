// One owner per live session (docs/decisions/032-one-owner-per-session.md): the processes of a
// cluster register in Redis, and each session belongs to the live member with the highest
// rendezvous weight for it (highest-random-weight hashing). Every process computes the same owner
// from the same member list with no coordination; when a member leaves, only its own sessions
// move (each to the member with the next-highest weight), and a new member takes about 1/n of them.
import { createHash } from 'node:crypto';
import type { Redis } from 'ioredis';

/** A member's weight for a session: the first 48 bits of SHA-1(member, session), as a number. */
export function weight(member: string, sessionId: number): number {
  return createHash('sha1').update(`${member}\u0000${sessionId}`).digest().readUIntBE(0, 6);
}

/** The owner of a session among `members` (highest weight; ties, which need equal hashes, by name). */
export function ownerOf(sessionId: number, members: readonly string[]): string | null {
  let best: string | null = null;
  let bestWeight = -1;
  for (const m of members) {
    const w = weight(m, sessionId);
    if (w > bestWeight || (w === bestWeight && best !== null && m < best)) {
      best = m;
      bestWeight = w;
    }
  }
  return best;
}

/** A member is alive while its heartbeat is younger than this (a hung process, a cut network). */
export const MEMBER_TTL_MS = 10_000;
/** How often each member renews its heartbeat and reads the member list. */
export const MEMBERSHIP_POLL_MS = 500;
/**
 * After this process's Redis connection comes back (Redis restarted: the list is empty until
 * every member has renewed), the list is not read for this long, so that nobody takes over the
 * sessions of members that simply have not renewed yet.
 */
export const SETTLE_AFTER_RECONNECT_MS = 2 * MEMBERSHIP_POLL_MS + 1000;

const CLIENT_PREFIX = 'parley-member:';

export interface MembershipOptions {
  /** this process's member id (unique per process start) */
  id: string;
  /** the Redis key of the member set */
  key?: string;
  ttlMs?: number;
  pollMs?: number;
  /** called after the member list changed, with the new and the previous list */
  onChange?: (members: readonly string[], previous: readonly string[]) => void;
}

/** The connection name Membership's Redis connection must carry (ioredis `connectionName`). */
export const memberConnectionName = (id: string) => `${CLIENT_PREFIX}${id}`;

/**
 * The live members, as seen from this process. Members are a sorted set in Redis (score: the time
 * the heartbeat runs out); a member whose process died is also dropped at once when its Redis
 * connection is gone (CLIENT LIST: the kernel closes a killed process's sockets), so a SIGKILL is
 * noticed within one poll rather than one TTL. Where CLIENT LIST is not allowed (some managed
 * Redis), the TTL alone decides.
 */
export class Membership {
  readonly id: string;
  private key: string;
  private ttlMs: number;
  private pollMs: number;
  private current: string[];
  private timer: NodeJS.Timeout | null = null;
  private settleUntil = 0;
  private clientListAllowed = true;
  private polling = false;
  /** the time of the last successful poll (0: none yet) */
  lastPoll = 0;
  /** raised at every change of the member list as this process sees it */
  version = 0;

  constructor(
    private redis: Redis,
    private opts: MembershipOptions,
  ) {
    this.id = opts.id;
    this.key = opts.key ?? 'parley:members';
    this.ttlMs = opts.ttlMs ?? MEMBER_TTL_MS;
    this.pollMs = opts.pollMs ?? MEMBERSHIP_POLL_MS;
    // Until Redis answered, this process knows only itself.
    this.current = [this.id];
    let wasConnected = false;
    redis.on('ready', () => {
      if (wasConnected) this.settleUntil = Date.now() + SETTLE_AFTER_RECONNECT_MS;
      wasConnected = true;
    });
  }

  /** Registers this process and reads the list once; then renews and reads every poll. */
  async join() {
    await this.poll();
    this.timer = setInterval(() => {
      this.poll().catch(() => undefined);
    }, this.pollMs);
    this.timer.unref();
  }

  members(): readonly string[] {
    return this.current;
  }

  owner(sessionId: number): string | null {
    return ownerOf(sessionId, this.current);
  }

  owns(sessionId: number): boolean {
    return this.owner(sessionId) === this.id;
  }

  /** One heartbeat and one read of the list. Throws when Redis does not answer (the list stays). */
  async poll() {
    if (this.polling) return;
    this.polling = true;
    try {
      const now = Date.now();
      const res = await this.redis
        .multi()
        .zadd(this.key, now + this.ttlMs, this.id)
        .zremrangebyscore(this.key, '-inf', now)
        .zrangebyscore(this.key, now, '+inf')
        .exec();
      const listed = res?.[2]?.[1];
      if (!Array.isArray(listed)) return;
      let alive = listed.filter((m): m is string => typeof m === 'string');
      const connected = await this.connectedMembers();
      if (connected) alive = alive.filter((m) => m === this.id || connected.has(m));
      if (!alive.includes(this.id)) alive.push(this.id);
      alive.sort();
      this.lastPoll = Date.now();
      if (Date.now() < this.settleUntil) return;
      if (alive.join() === this.current.join()) return;
      const previous = this.current;
      this.current = alive;
      this.version++;
      this.opts.onChange?.(alive, previous);
    } finally {
      this.polling = false;
    }
  }

  /** Member ids with an open Redis connection, or null where CLIENT LIST is not allowed. */
  private async connectedMembers(): Promise<Set<string> | null> {
    if (!this.clientListAllowed) return null;
    try {
      const list = String(await this.redis.client('LIST'));
      const ids = new Set<string>();
      for (const m of list.matchAll(/ name=parley-member:(\S+)/g)) ids.add(m[1]);
      return ids;
    } catch {
      this.clientListAllowed = false;
      return null;
    }
  }

  /** Leaves at once (a graceful stop): the others see it at their next poll. */
  async leave() {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.redis.zrem(this.key, this.id).catch(() => undefined);
  }
}
