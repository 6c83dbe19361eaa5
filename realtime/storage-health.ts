// Whether this process can reach MariaDB, as the live runner sees it. A write that has not
// answered within the bound, or that failed for want of a connection, marks storage as lost; from
// then on a probe (`SELECT 1`) runs every half second until one answers, and the runner is told
// at each change (phones say "reconnecting"; on recovery every waiting round gets its time back).

/** mysql2 / Node error codes that mean "no database", not "a bad query" */
const CONNECTION_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'EPIPE',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'ER_SERVER_SHUTDOWN',
  'ER_CON_COUNT_ERROR',
  'POOL_CLOSED',
]);

/** True for an error (or an error it wraps, as Drizzle's query errors do) that is a lost database. */
export function isStorageError(error: unknown): boolean {
  for (let e: unknown = error, depth = 0; e && typeof e === 'object' && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const { code, fatal } = e as { code?: unknown; fatal?: unknown };
    if (fatal === true || (typeof code === 'string' && CONNECTION_CODES.has(code))) return true;
    if (e instanceof StorageUnavailable) return true;
  }
  return false;
}

/** Refused because the database did not answer in time (ack code 'unavailable'). */
export class StorageUnavailable extends Error {
  readonly code = 'unavailable';
  constructor(message = 'The server cannot reach its database just now. Your phone keeps your choice and sends it again.') {
    super(message);
    this.name = 'StorageUnavailable';
  }
}

export class StorageHealth {
  private lost: { since: number } | null = null;
  private probing = false;
  private closed = false;
  private lastAnswer = Date.now();
  private heartbeat: NodeJS.Timeout | null = null;
  private beating: number | null = null;

  constructor(
    private readonly probe: () => Promise<unknown>,
    private readonly onChange: (ok: boolean) => void,
    private readonly opts: { everyMs?: number; staleMs?: number } = {},
  ) {}

  private get everyMs() {
    return this.opts.everyMs ?? 500;
  }

  get ok(): boolean {
    return this.lost === null;
  }

  /** MariaDB answered (a commit, a probe). */
  answered(): void {
    this.lastAnswer = Date.now();
  }

  /**
   * Storage is known to answer: not lost, and something answered within `staleMs`. A round's
   * timer asks this before it fills in a timeout, so a stall nobody has written into yet does not
   * time out rounds the phones cannot answer. Not fresh → storage is treated as lost (probing starts).
   */
  fresh(): boolean {
    if (!this.ok) return false;
    if (Date.now() - this.lastAnswer <= (this.opts.staleMs ?? 3000)) return true;
    this.trouble();
    return false;
  }

  /** A probe every second while storage is fine, so `fresh()` knows without waiting for a write. */
  startHeartbeat(): void {
    if (this.heartbeat) return;
    this.heartbeat = setInterval(() => {
      if (!this.ok || this.closed) return;
      if (this.beating !== null) {
        if (Date.now() - this.beating > (this.opts.staleMs ?? 3000)) this.trouble();
        return;
      }
      const started = (this.beating = Date.now());
      this.probe().then(
        () => {
          if (this.beating === started) this.beating = null;
          this.answered();
        },
        () => {
          if (this.beating === started) this.beating = null;
          this.trouble();
        },
      );
    }, 1000);
    this.heartbeat.unref();
  }

  /** when storage was lost (ms since the epoch), or null */
  get lostSince(): number | null {
    return this.lost?.since ?? null;
  }

  /** A write timed out or lost its connection. */
  trouble(): void {
    if (this.lost || this.closed) return;
    this.lost = { since: Date.now() };
    this.onChange(false);
    void this.loop();
  }

  private async loop(): Promise<void> {
    if (this.probing) return;
    this.probing = true;
    // One probe at a time: during a stall a probe hangs until MariaDB runs again, and that moment
    // is exactly the recovery.
    let pending: Promise<boolean> | null = null;
    try {
      while (this.lost && !this.closed) {
        pending ??= this.probe().then(
          () => true,
          () => false,
        );
        const answered = await Promise.race([pending, sleep(this.everyMs).then(() => null)]);
        if (answered === null) continue; // still hanging
        pending = null;
        if (answered) {
          this.lost = null;
          this.beating = null;
          this.answered();
          if (!this.closed) this.onChange(true);
        } else {
          await sleep(this.everyMs);
        }
      }
    } finally {
      this.probing = false;
    }
  }

  close(): void {
    this.closed = true;
    if (this.heartbeat) clearInterval(this.heartbeat);
  }
}

function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => {
    const t = setTimeout(resolve, ms);
    t.unref();
  });
}
