// The session runner: one engine state per live session in this process, rebuilt from MariaDB
// whenever it may be stale, stepped one event at a time per session, persisted in one transaction
// per step, then acknowledged, then timers and broadcasts. Created once, in server.ts, and reached
// from route modules through globalThis (app/utils/runner.server.ts), because the built app bundle
// and server.ts would otherwise each hold their own copy.
import { and, eq, inArray, sql } from 'drizzle-orm';
import type { Server } from 'socket.io';
import { getSession, rebuildSession, type StoredSession, writeEffects } from '#app/models/live.server';
import { db } from '#app/utils/db.server';
import { sessions } from '#drizzle/schema';
import { resumeEffects, step } from './engine/engine';
import type { Effect, EngineEvent, EngineState, StepResult } from './engine/types';
import { bigScreenView, floorView } from './engine/views';
import type { ServerToClientEvents } from './protocol';

interface Live {
  session: StoredSession;
  state: EngineState;
  queue: Promise<unknown>;
}

class StaleState extends Error {}

const TICK_MS = 5000;
const EVICT_AFTER_MS = 60_000;

export class SessionRunner {
  private live = new Map<number, Live>();
  private loading = new Map<number, Promise<Live | null>>();
  private timers = new Map<string, NodeJS.Timeout>();
  private tick: NodeJS.Timeout;
  private closed = false;

  constructor(private io: Server<Record<string, never>, ServerToClientEvents> | null) {
    this.tick = setInterval(() => void this.tickAll(), TICK_MS);
    this.tick.unref();
  }

  /** After a restart: every open, running or paused session is rebuilt and its timers re-armed. */
  async recoverAll() {
    const rows = await db()
      .select({ id: sessions.id })
      .from(sessions)
      .where(and(inArray(sessions.status, ['open', 'running', 'paused']), eq(sessions.simulated, 0)));
    for (const r of rows) {
      const live = await this.load(r.id);
      if (live) this.applyTimers(r.id, resumeEffects(live.state));
    }
    return rows.length;
  }

  /** The current engine state of a session (loaded from the database if needed). */
  async state(sessionId: number): Promise<EngineState | null> {
    const live = await this.load(sessionId);
    return live?.state ?? null;
  }

  async sessionOf(sessionId: number): Promise<StoredSession | null> {
    return (await this.load(sessionId))?.session ?? null;
  }

  /**
   * Applies one event. Errors come back in the result (with the state unchanged); the result's
   * `row` is a stored choice. Persisted before anything is acknowledged or broadcast.
   */
  async dispatch(sessionId: number, event: EngineEvent, opts: { userId?: number | null } = {}): Promise<StepResult> {
    const live = await this.load(sessionId);
    if (!live) throw new Error(`no session ${sessionId}`);
    const run = live.queue.then(() => this.apply(live, event, opts.userId ?? null));
    live.queue = run.catch(() => undefined);
    return run;
  }

  private async apply(live: Live, event: EngineEvent, userId: number | null, retried = false): Promise<StepResult> {
    const res = step(live.state, event, Date.now(), { staffViews: 'refresh' });
    if (res.error) return res;
    const persists = res.effects.filter((e) => e.type.startsWith('persist-'));
    if (persists.length) {
      try {
        await db().transaction(async (tx) => {
          // Serialise steps of this session across processes, and refuse to write on a stale state.
          await tx.execute(sql`SELECT id FROM sessions WHERE id = ${live.session.id} FOR UPDATE`);
          const [rows] = (await tx.execute(
            sql`SELECT GREATEST(
                  COALESCE((SELECT MAX(seq) FROM choices WHERE session_id = ${live.session.id}), 0),
                  COALESCE((SELECT MAX(seq) FROM session_log WHERE session_id = ${live.session.id}), 0),
                  COALESCE((SELECT MAX(seq) FROM session_participants WHERE session_id = ${live.session.id}), 0)) AS seq`,
          )) as unknown as [{ seq: number | string }[]];
          if (Number(rows[0]?.seq ?? 0) !== live.state.seq) throw new StaleState();
          await writeEffects(tx, live.session.id, persists, userId);
        });
      } catch (error) {
        if (retried) throw error;
        // Another process (or a failed write) moved the session on: rebuild and try once more.
        live.state = await rebuildSession(live.session);
        return this.apply(live, event, userId, true);
      }
    }
    live.state = res.state;
    if (res.state.status === 'complete' || res.state.status === 'archived' || res.state.status === 'cancelled') {
      live.session = { ...live.session, status: res.state.status };
      // A finished session leaves memory a little later; a phone that asks again reloads it.
      const t = setTimeout(() => {
        if (this.live.get(live.session.id) === live) this.live.delete(live.session.id);
      }, EVICT_AFTER_MS);
      t.unref();
    }
    this.applyTimers(live.session.id, res.effects);
    this.broadcast(live, res.effects);
    return res;
  }

  private applyTimers(sessionId: number, effects: readonly Effect[]) {
    for (const e of effects) {
      if (e.type === 'cancel-timer') {
        clearTimeout(this.timers.get(e.key));
        this.timers.delete(e.key);
      } else if (e.type === 'schedule-timer') {
        clearTimeout(this.timers.get(e.key));
        const event = e.event;
        const t = setTimeout(
          () => {
            this.timers.delete(e.key);
            if (!this.closed) void this.dispatch(sessionId, event).catch((err) => console.error('[parley] timer', err));
          },
          Math.max(0, e.at - Date.now()),
        );
        t.unref();
        this.timers.set(e.key, t);
      }
    }
  }

  private broadcast(live: Live, effects: readonly Effect[]) {
    if (!this.io) return;
    const refreshed = new Set<string>();
    for (const e of effects) {
      if (e.type === 'broadcast') {
        if (e.payload.kind === 'participant-view') this.io.to(e.room).emit('view:participant', e.payload.view);
        else if (e.payload.kind === 'floor-view') this.io.to(e.room).emit('view:floor', e.payload.view);
        else this.io.to(e.room).emit('view:big-screen', e.payload.view);
      } else if (e.type === 'refresh-view' && !refreshed.has(e.room)) {
        refreshed.add(e.room);
        if (e.view === 'floor') this.io.to(e.room).emit('view:floor', floorView(live.state, Date.now()));
        else this.io.to(e.room).emit('view:big-screen', bigScreenView(live.state));
      }
    }
  }

  private async load(sessionId: number): Promise<Live | null> {
    const have = this.live.get(sessionId);
    if (have) return have;
    let pending = this.loading.get(sessionId);
    if (!pending) {
      pending = (async () => {
        const session = await getSession(sessionId);
        if (!session) return null;
        const live: Live = { session, state: await rebuildSession(session), queue: Promise.resolve() };
        this.live.set(sessionId, live);
        return live;
      })().finally(() => this.loading.delete(sessionId));
      this.loading.set(sessionId, pending);
    }
    return pending;
  }

  /** A new session was created (draft): nothing to load yet, but forget any stale copy. */
  forget(sessionId: number) {
    this.live.delete(sessionId);
  }

  private async tickAll() {
    for (const [id, live] of this.live) {
      if (live.state.status === 'running') await this.dispatch(id, { type: 'tick' }).catch(() => undefined);
    }
  }

  close() {
    this.closed = true;
    clearInterval(this.tick);
    for (const t of this.timers.values()) clearTimeout(t);
    this.timers.clear();
  }
}
