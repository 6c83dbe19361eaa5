// Per-socket token buckets, one per event kind: a socket may send a burst, then events at a steady
// rate; past that its events are answered `rate-limited` and never reach a handler. Issue 9,
// finding 12 (3,000 `session:watch` in a second made 3,000 floor views). A dozen lines of our own
// rather than a package: the state lives and dies with the socket, and the check is synchronous.
import type { ClientToServerEvents } from './protocol';

export interface BucketSpec {
  /** tokens added per second */
  perSecond: number;
  /** tokens a new or idle socket starts with (the largest burst) */
  burst: number;
}

/**
 * Normal use is far below these: a page watches a session once per (re)connect; a participant
 * makes one choice per round and retries it a few times at most; staff act on a few pairs at once.
 */
export const EVENT_LIMITS: Record<keyof ClientToServerEvents, BucketSpec> = {
  'me:get': { perSecond: 5, burst: 10 },
  'session:watch': { perSecond: 5, burst: 10 },
  'choice:submit': { perSecond: 10, burst: 20 },
  'session:control': { perSecond: 5, burst: 10 },
  'participant:act': { perSecond: 10, burst: 30 },
};
/** Any other event name shares one bucket, so made-up names cannot create buckets without end. */
const OTHER: BucketSpec = { perSecond: 5, burst: 10 };

export class TokenBucket {
  private tokens: number;
  private last: number;

  constructor(
    private readonly spec: BucketSpec,
    now: number,
  ) {
    this.tokens = spec.burst;
    this.last = now;
  }

  /** Takes a token if there is one. */
  take(now: number): boolean {
    this.tokens = Math.min(this.spec.burst, this.tokens + ((now - this.last) / 1000) * this.spec.perSecond);
    this.last = now;
    if (this.tokens < 1) return false;
    this.tokens -= 1;
    return true;
  }
}

/** One socket's buckets. */
export class EventLimiter {
  private readonly buckets = new Map<string, TokenBucket>();

  constructor(private readonly now: () => number = Date.now) {}

  allow(event: string): boolean {
    const known = Object.hasOwn(EVENT_LIMITS, event);
    const key = known ? event : '*';
    let bucket = this.buckets.get(key);
    if (!bucket) {
      bucket = new TokenBucket(known ? EVENT_LIMITS[event as keyof ClientToServerEvents] : OTHER, this.now());
      this.buckets.set(key, bucket);
    }
    return bucket.take(this.now());
  }
}
