// The session runner: one engine state per live session in this process, rebuilt from MariaDB
// whenever it may be stale. Events of a session are applied in batches (group commit): while one
// batch is being written, the events that arrive wait; when it commits they are stepped one after
// the other on the new state and written together in one transaction — one lock and one sequence
// check (the session row's `seq`), one multi-row INSERT — and only then acknowledged. A participant's
// view is built once per batch; the Floor and the Big screen at most every STAFF_VIEW_MS, and only
// while someone watches. Created once, in server.ts, and reached from route modules through
// globalThis (app/utils/runner.server.ts), because the built app bundle and server.ts would
// otherwise each hold their own copy.
import { and, eq, inArray, sql } from 'drizzle-orm';
import {
  claimLease,
  Fenced,
  getSession,
  leaseOf,
  rebuildSession,
  StaleState,
  type StoredSession,
  writeEffects,
} from '#app/models/live.server';
import { db } from '#app/utils/db.server';
import { sessions } from '#drizzle/schema';
import { newBatchScope, resumeEffects, roomOf, step } from './engine/engine';
import type { Effect, EngineError, EngineEvent, EngineState, StepResult } from './engine/types';
import { bigScreenView, floorView, participantView } from './engine/views';
import type { WatchedView } from './protocol';
import { isStorageError, StorageHealth, StorageUnavailable } from './storage-health';

/** What the runner needs of socket.io: who listens where, a view to its room, storage news to all. */
export interface Broadcaster {
  listening(room: string): boolean;
  /** the view goes out as its kind's event (`view:participant`, `view:floor`, `view:big-screen`) */
  view(room: string, view: WatchedView): void;
  storage(ok: boolean): void;
}

/**
 * In cluster mode (realtime/cluster.ts): which sessions this process owns, and how an event of a
 * session owned elsewhere reaches its owner. Without it, this process owns every session.
 */
export interface Ownership {
  owns(sessionId: number): boolean;
  /**
   * Applies the event on the owner (this process or another), taking the session over first
   * where this process owns it and does not hold it; the answer says only whether the engine
   * refused it.
   */
  dispatchAtOwner(sessionId: number, event: EngineEvent, userId: number | null): Promise<{ error: EngineError | null }>;
  /** this process's copy of the session was fenced off: another process took the session over */
  fenced(sessionId: number): void;
  /** for /healthz */
  health(): Promise<ClusterHealth>;
}

/**
 * Refused because another process took the session over while this one still held it (ack code
 * 'unavailable': nothing of the event was stored, and the phone sends it again).
 */
export class SessionMoved extends Error {
  static readonly message = 'The server that runs this session is changing: wait a moment and try again.';
  readonly code = 'unavailable';
  constructor() {
    super(SessionMoved.message);
    this.name = 'SessionMoved';
  }
}

export interface ClusterHealth {
  /** Redis answers a PING within a second */
  redis: boolean;
  /** the adapter's publish and subscribe connections are up */
  adapter: boolean;
  member: string;
  members: string[];
  /** sessions this process owns and holds in memory */
  sessionsHeld: number[];
}

interface Waiter {
  event: EngineEvent;
  userId: number | null;
  settle: (outcome: StepResult | Error) => void;
}

interface Live {
  session: StoredSession;
  state: EngineState;
  /** the session's lease epoch this copy was read under: every write claims it (Fenced when it moved on) */
  epoch: number;
  /** events waiting for the batch in flight to commit */
  waiting: Waiter[];
  writing: boolean;
  staff: { dirty: boolean; last: number; timer: NodeJS.Timeout | null };
}

const numberFromEnv = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v > 0 ? v : fallback;
};

const TICK_MS = 5000;
const EVICT_AFTER_MS = 60_000;
/** a write (or the heartbeat's SELECT 1) that MariaDB has not answered after this long means storage is lost */
const STORAGE_WAIT_MS = numberFromEnv('PARLEY_STORAGE_WAIT_MS', 3000);
/** the longest any event waits for its answer, queueing included, before 'unavailable' */
const WAITER_BOUND_MS = numberFromEnv('PARLEY_WAITER_BOUND_MS', 20_000);
/** the Floor and the Big screen are rebuilt at most this often per session */
const STAFF_VIEW_MS = numberFromEnv('PARLEY_STAFF_VIEW_MS', 250);
/** a batch larger than this is split: one transaction stays a few thousand rows at most */
const MAX_BATCH = 2000;
/** how often a batch is stepped again on a rebuilt state when another writer moved the session on */
const STALE_RETRIES = 3;

const finished = (status: string) => status === 'complete' || status === 'archived' || status === 'cancelled';

export class SessionRunner {
  private live = new Map<number, Live>();
  private loading = new Map<number, Promise<Live | null>>();
  /** per session: timer key → its timeout, so releasing a session cancels exactly its timers */
  private timers = new Map<number, Map<string, NodeJS.Timeout>>();
  private ownership: Ownership | null = null;
  private tick: NodeJS.Timeout;
  private closed = false;
  private recovering = false;
  /** every dispatched event not answered yet */
  private waiters = new Set<Waiter>();
  readonly health: StorageHealth;

  constructor(private out: Broadcaster | null) {
    this.tick = setInterval(() => void this.tickAll(), TICK_MS);
    this.tick.unref();
    this.health = new StorageHealth(
      () => db().execute(sql`SELECT 1`),
      (ok) => this.onStorage(ok),
      { staleMs: STORAGE_WAIT_MS },
    );
    this.health.startHeartbeat();
  }

  /**
   * After a restart: every open, running or paused session is rebuilt, and every round still
   * waiting for a choice gets its full time from now (the phones could not answer while the
   * server was down).
   */
  async recoverAll() {
    const ids = (await this.liveSessionIds()).filter((id) => this.owns(id) && !this.live.has(id));
    this.recovering = true;
    try {
      for (const id of ids) await this.graceOne(id);
    } finally {
      this.recovering = false;
    }
    return ids.length;
  }

  /** Every open, running or paused session in the database (simulated ones never run live). */
  async liveSessionIds(): Promise<number[]> {
    const rows = await db()
      .select({ id: sessions.id })
      .from(sessions)
      .where(and(inArray(sessions.status, ['open', 'running', 'paused']), eq(sessions.simulated, false)));
    return rows.map((r) => r.id);
  }

  /** Cluster mode: from now on this process steps only the sessions `ownership` says it owns. */
  setOwnership(ownership: Ownership | null) {
    this.ownership = ownership;
  }

  /** In cluster mode: Redis, the adapter and the members, as this process sees them; else null. */
  clusterHealth(): Promise<ClusterHealth> | null {
    return this.ownership ? this.ownership.health() : null;
  }

  owns(sessionId: number): boolean {
    return this.ownership ? this.ownership.owns(sessionId) : true;
  }

  /** The sessions this process holds in memory (owned, or owned until a moment ago). */
  heldSessions(): number[] {
    return [...this.live.keys()];
  }

  holds(sessionId: number): boolean {
    return this.live.has(sessionId);
  }

  /**
   * Takes a session over (its owner died or membership changed): rebuilt from MariaDB, then the
   * grace every waiting round gets after a restart — nobody is timed out for rounds they could
   * not answer while no process was stepping the session; timers are armed again from the state.
   */
  async takeOver(sessionId: number) {
    await this.release(sessionId);
    // A load that started before the lease was taken would read an older epoch: let it land, drop it.
    await this.loading.get(sessionId)?.catch(() => undefined);
    await this.release(sessionId);
    // Taking the lease fences off every other process that still holds the session: its next
    // write fails (Fenced) instead of storing a row this copy does not know of. No such session
    // (a forged id): nothing to take over; the event itself answers not-found.
    const epoch = await claimLease(sessionId);
    if (epoch === null) return;
    await this.load(sessionId, epoch);
    await this.graceOne(sessionId);
  }

  /** Rebuilds a held session from MariaDB (another writer moved it on, or it may be stale). */
  async refresh(sessionId: number) {
    await this.release(sessionId);
    await this.load(sessionId);
  }

  /**
   * Drops the in-memory copy of a session, with its timers and its pending staff view: another
   * process owns it now. A batch being written is let finish first; events still queued are
   * answered 'unavailable' (the phone sends them again, and they reach the new owner).
   */
  async release(sessionId: number) {
    const live = this.live.get(sessionId);
    if (!live) return;
    for (let i = 0; i < 100 && live.writing; i++) await new Promise((r) => setTimeout(r, 50));
    if (this.live.get(sessionId) !== live) return;
    this.forget(live, [], () => new StorageUnavailable());
  }

  /**
   * An event from a route (a join, the opening of a session): applied here when this process owns
   * the session, else by its owner. Says only whether the engine refused it.
   */
  async submit(sessionId: number, event: EngineEvent, opts: { userId?: number | null } = {}): Promise<{ error: EngineError | null }> {
    if (this.ownership) return this.ownership.dispatchAtOwner(sessionId, event, opts.userId ?? null);
    const res = await this.dispatch(sessionId, event, opts);
    return { error: res.error ?? null };
  }

  private async graceAll() {
    for (const [id, live] of this.live) {
      if (live.state.status === 'running' || live.state.status === 'paused') await this.graceOne(id);
    }
  }

  private async graceOne(sessionId: number) {
    try {
      await this.dispatch(sessionId, { type: 'grace' });
    } catch (error) {
      // Storage lost again: the next recovery tries again. Meanwhile arm what the state has.
      const live = this.live.get(sessionId);
      if (live) this.applyTimers(sessionId, resumeEffects(live.state));
      if (!(error instanceof StorageUnavailable || error instanceof SessionMoved)) console.error('[parley] grace', error);
    }
  }

  /** The current engine state of a session (loaded from the database if needed). */
  async state(sessionId: number): Promise<EngineState | null> {
    if (!this.owns(sessionId) && !this.live.has(sessionId)) {
      // Owned by another process: read from MariaDB, and keep no copy that would go stale.
      const session = await getSession(sessionId);
      return session ? rebuildSession(session) : null;
    }
    const live = await this.load(sessionId);
    return live?.state ?? null;
  }

  async sessionOf(sessionId: number): Promise<StoredSession | null> {
    if (!this.owns(sessionId) && !this.live.has(sessionId)) return getSession(sessionId);
    return (await this.load(sessionId))?.session ?? null;
  }

  /**
   * Applies one event, in the next batch of its session. Engine errors come back in the result
   * (with the state unchanged); the result's `row` is a stored choice. Resolves only after the
   * batch is committed. Throws StorageUnavailable when MariaDB is known to be lost or does not
   * answer within STORAGE_WAIT_MS (the event may still be stored: a retry of a choice with the
   * same client choice id returns the stored row).
   */
  dispatch(sessionId: number, event: EngineEvent, opts: { userId?: number | null } = {}): Promise<StepResult> {
    if (!this.health.ok && event.type !== 'grace') return Promise.reject(new StorageUnavailable());
    return new Promise<StepResult>((resolve, reject) => {
      let done = false;
      const waiter: Waiter = {
        event,
        userId: opts.userId ?? null,
        settle: (outcome) => {
          if (done) return;
          done = true;
          clearTimeout(bound);
          this.waiters.delete(waiter);
          if (outcome instanceof Error) reject(outcome);
          else resolve(outcome);
        },
      };
      this.waiters.add(waiter);
      // A last resort only: a busy session legitimately queues for a while (a thousand choices at
      // once), so waiting alone says nothing about MariaDB. Lost storage is noticed by the write
      // watchdog and the heartbeat, and answers every waiter at once (see onStorage).
      const bound = setTimeout(() => {
        const live = this.live.get(sessionId);
        if (live) live.waiting = live.waiting.filter((w) => w !== waiter);
        waiter.settle(new StorageUnavailable());
      }, WAITER_BOUND_MS);
      bound.unref();
      this.load(sessionId).then(
        (live) => {
          if (done) return;
          if (!live) return waiter.settle(new Error(`no session ${sessionId}`));
          live.waiting.push(waiter);
          this.pump(live);
        },
        (error) => waiter.settle(this.storageFailure(error)),
      );
    });
  }

  /**
   * Storage lost: every event still waiting is answered 'unavailable' now (queued ones will not be
   * applied; those in the batch being written have an unknown outcome, which a retry with the same
   * client choice id resolves). Recovered: every waiting round gets its full time again.
   */
  private onStorage(ok: boolean) {
    console.warn(
      ok
        ? '[parley] database answers again: every waiting round gets its full time'
        : '[parley] database not answering: choices are refused until it does',
    );
    this.out?.storage(ok);
    if (ok) {
      void this.graceAll();
      return;
    }
    for (const live of this.live.values()) live.waiting = [];
    for (const w of [...this.waiters]) if (w.event.type !== 'grace') w.settle(new StorageUnavailable());
  }

  /** A storage failure becomes 'unavailable' (and marks storage lost); anything else stays itself. */
  private storageFailure(error: unknown): Error {
    if (!isStorageError(error)) return error instanceof Error ? error : new Error(String(error));
    this.health.trouble();
    return new StorageUnavailable();
  }

  private pump(live: Live) {
    if (live.writing || live.waiting.length === 0) return;
    const batch = live.waiting.splice(0, MAX_BATCH);
    live.writing = true;
    void this.write(live, batch).finally(() => {
      live.writing = false;
      this.pump(live);
    });
  }

  /** Step a batch on the current state, store it in one transaction, then answer everyone. */
  private async write(live: Live, batch: Waiter[]): Promise<void> {
    try {
      for (let attempt = 0; ; attempt++) {
        const from = live.state;
        let state = from;
        const results: StepResult[] = [];
        const persists: Effect[] = [];
        const timers: Effect[] = [];
        const touched = new Set<string>();
        const scope = newBatchScope();
        for (const w of batch) {
          const res = step(state, w.event, Date.now(), { views: 'none', batch: scope });
          results.push(res);
          if (res.error) continue;
          state = res.state;
          for (const e of res.effects) {
            if (e.type === 'persist-log') persists.push({ ...e, by: w.userId });
            else if (e.type.startsWith('persist-')) persists.push(e);
            else timers.push(e);
          }
          for (const id of res.touched) touched.add(id);
        }
        if (persists.length) {
          // The watchdog: MariaDB silent on this write for STORAGE_WAIT_MS → storage is lost.
          const watchdog = setTimeout(() => this.health.trouble(), STORAGE_WAIT_MS);
          watchdog.unref();
          try {
            await db().transaction((tx) =>
              writeEffects(tx, live.session.id, persists, null, { claim: { from: from.seq, to: state.seq, epoch: live.epoch } }),
            );
            this.health.answered();
          } catch (error) {
            // Another writer under the same lease (a commit whose answer was lost, a process
            // outside the cluster) moved the session on: rebuild from the stored rows and step
            // the batch again. A stored choice then comes back as 'already-chosen' with its row,
            // which the hub acknowledges as a success.
            if (error instanceof StaleState && attempt < STALE_RETRIES) {
              live.state = await this.rebuilt(live);
              continue;
            }
            throw error;
          } finally {
            clearTimeout(watchdog);
          }
        } else if (this.ownership) {
          // Nothing to store, so nothing checked the copy against the database: in a cluster
          // another process may have taken the session over, and a refusal ("not this round")
          // or a view from this copy would be out of date. One read of the row says.
          const now = await leaseOf(db(), live.session.id);
          if (now && now.epoch !== live.epoch) throw new Fenced(live.session.id, live.epoch);
          if (now && now.seq !== from.seq) {
            if (attempt >= STALE_RETRIES) throw new StaleState(live.session.id, from.seq);
            live.state = await this.rebuilt(live);
            continue;
          }
        }
        live.state = state;
        batch.forEach((w, i) => w.settle(results[i]));
        this.after(
          live,
          timers,
          touched,
          results.some((r) => !r.error),
        );
        return;
      }
    } catch (error) {
      if (error instanceof Fenced || error instanceof StaleState) {
        // Taken over by another process (or moved on faster than this copy could follow): this
        // copy is dropped, nothing of the batch was stored, and each event is answered
        // 'unavailable' — the phone sends it again, and it reaches the current owner.
        this.forget(live, batch, () => new SessionMoved());
        if (error instanceof Fenced) this.ownership?.fenced(live.session.id);
        else console.warn(`[parley] ${error.message}: copy dropped, events answered 'unavailable'`);
        return;
      }
      const failure = this.storageFailure(error);
      if (!(failure instanceof StorageUnavailable)) console.error('[parley] batch failed', error);
      for (const w of batch) w.settle(failure);
    }
  }

  /**
   * The copy rebuilt from the stored rows, keeping what this process knows of the phones'
   * connections (they are not stored: a rebuild alone would count every phone as gone).
   */
  private async rebuilt(live: Live): Promise<EngineState> {
    return { ...(await rebuildSession(live.session)), connections: live.state.connections };
  }

  /**
   * Forgets a copy at once: its timers, its pending staff view, and every event waiting on it
   * (`batch`: those of the batch being written, when called from inside it) answered with `error`.
   */
  private forget(live: Live, batch: readonly Waiter[], error: () => Error) {
    const id = live.session.id;
    if (this.live.get(id) === live) {
      this.live.delete(id);
      for (const t of this.timers.get(id)?.values() ?? []) clearTimeout(t);
      this.timers.delete(id);
    }
    if (live.staff.timer) clearTimeout(live.staff.timer);
    live.staff.timer = null;
    const waiting = [...batch, ...live.waiting];
    live.waiting = [];
    for (const w of waiting) w.settle(error());
  }

  /** After a commit: timers, participants' own views, staff views later, eviction when finished. */
  private after(live: Live, timers: readonly Effect[], touched: ReadonlySet<string>, changed: boolean) {
    const id = live.session.id;
    this.applyTimers(id, timers);
    if (this.out) {
      const sid = String(id);
      for (const p of touched) {
        const room = roomOf('participant', sid, p);
        if (this.out.listening(room)) this.out.view(room, participantView(live.state, p));
      }
    }
    if (changed) this.staffChanged(live);
    if (finished(live.state.status) && !finished(live.session.status)) {
      live.session = { ...live.session, status: live.state.status };
      // A finished session leaves memory a little later; a phone that asks again reloads it.
      const t = setTimeout(() => {
        if (this.live.get(id) === live) void this.release(id);
      }, EVICT_AFTER_MS);
      t.unref();
    }
  }

  /** Coalesce: the staff views of a session go out at most every STAFF_VIEW_MS, after the acks. */
  private staffChanged(live: Live) {
    const s = live.staff;
    s.dirty = true;
    if (s.timer || !this.out) return;
    s.timer = setTimeout(
      () => {
        s.timer = null;
        this.flushStaff(live);
      },
      Math.max(0, s.last + STAFF_VIEW_MS - Date.now()),
    );
    s.timer.unref();
  }

  private flushStaff(live: Live) {
    const s = live.staff;
    if (!s.dirty || !this.out) return;
    s.dirty = false;
    s.last = Date.now();
    const sid = String(live.session.id);
    const floor = roomOf('staff', sid);
    const screen = roomOf('session', sid);
    // Nobody watching: nothing is built (socket.io would encode the frame before it looks at the room).
    if (this.out.listening(floor)) this.out.view(floor, floorView(live.state, s.last));
    if (this.out.listening(screen)) this.out.view(screen, bigScreenView(live.state));
  }

  private applyTimers(sessionId: number, effects: readonly Effect[]) {
    let timers = this.timers.get(sessionId);
    if (!timers) {
      timers = new Map();
      this.timers.set(sessionId, timers);
    }
    const mine = timers;
    for (const e of effects) {
      if (e.type === 'cancel-timer') {
        clearTimeout(mine.get(e.key));
        mine.delete(e.key);
      } else if (e.type === 'schedule-timer') {
        clearTimeout(mine.get(e.key));
        const event = e.event;
        const t = setTimeout(
          () => {
            mine.delete(e.key);
            // Storage lost, or silent for a while (a stall nobody has written into yet): no timeout
            // now. Recovery applies grace, which arms this round again with its full time.
            if (this.closed || !this.health.fresh()) return;
            // Another process owns the session now: its owner armed this timer again when it took over.
            if (!this.owns(sessionId)) return;
            this.dispatch(sessionId, event).catch((err) => {
              if (!(err instanceof StorageUnavailable || err instanceof SessionMoved)) console.error('[parley] timer', err);
            });
          },
          Math.max(0, e.at - Date.now()),
        );
        t.unref();
        mine.set(e.key, t);
      }
    }
  }

  /**
   * The copy of a session, read from MariaDB when this process holds none. `epoch`: the lease just
   * taken (a takeover); otherwise the copy adopts the stored one. Read before the rows, so rows
   * stored under a later lease can never hide behind an older epoch.
   */
  private async load(sessionId: number, epoch?: number): Promise<Live | null> {
    const have = this.live.get(sessionId);
    if (have) return have;
    let pending = this.loading.get(sessionId);
    if (!pending) {
      pending = (async () => {
        const lease = epoch === undefined ? await leaseOf(db(), sessionId) : null;
        const session = await getSession(sessionId);
        if (!session) return null;
        const live: Live = {
          session,
          epoch: epoch ?? lease?.epoch ?? 0,
          state: await rebuildSession(session),
          waiting: [],
          writing: false,
          staff: { dirty: false, last: 0, timer: null },
        };
        this.live.set(sessionId, live);
        return live;
      })().finally(() => this.loading.delete(sessionId));
      this.loading.set(sessionId, pending);
    }
    return pending;
  }

  /** A safety net for a lost timer: due rounds are filled in by the timeout rule. */
  private async tickAll() {
    if (this.recovering || !this.health.ok) return;
    for (const [id, live] of this.live) {
      if (live.state.status === 'running' && this.owns(id)) await this.dispatch(id, { type: 'tick' }).catch(() => undefined);
    }
  }

  close() {
    this.closed = true;
    this.health.close();
    clearInterval(this.tick);
    for (const timers of this.timers.values()) for (const t of timers.values()) clearTimeout(t);
    this.timers.clear();
    for (const live of this.live.values()) if (live.staff.timer) clearTimeout(live.staff.timer);
  }
}
