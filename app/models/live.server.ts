// Persistence of live sessions: the engine's effects in, the rows that rebuild it out.
import { randomInt } from 'node:crypto';
import { and, asc, eq, sql } from 'drizzle-orm';
import { db } from '#app/utils/db.server';
import { choices, sessionLog, sessionPairs, sessionParticipants, sessions, supergameDraws } from '#drizzle/schema';
import { rebuild } from '#realtime/engine/rebuild';
import { type Session, sessionColumns, toSession } from './session-row.server';
import type { StoredChoice, Effect, EngineState, LogRow, ParticipantRow } from '#realtime/engine/types';

/** No 0/O and no 1/I: codes are read off a projector and typed on phones. */
export const JOIN_ALPHABET = 'ABCDEFGHJKLMNPQRSTUVWXYZ23456789';
export const JOIN_CODE_LENGTH = 6;

export function newJoinCode() {
  let code = '';
  for (let i = 0; i < JOIN_CODE_LENGTH; i++) code += JOIN_ALPHABET[randomInt(JOIN_ALPHABET.length)];
  return code;
}

export function newSeed() {
  return randomInt(0, 2 ** 32 - 1);
}

type Tx = Parameters<Parameters<ReturnType<typeof db>['transaction']>[0]>[0];
type Writer = ReturnType<typeof db> | Tx;

/** The engine's participant id for a user. */
export const participantKeyOf = (userId: number) => String(userId);
const userIdOf = (key: string) => Number(key);

/** Another writer moved the session on since this process last read it: rebuild and try again. */
export class StaleState extends Error {
  constructor(sessionId: number, from: number) {
    super(`session ${sessionId} is no longer at sequence ${from}`);
    this.name = 'StaleState';
  }
}

/**
 * Another process took the session over (cluster mode: it raised the session's lease epoch, the
 * fencing token) since this process last read it: this process must not write it any more.
 */
export class Fenced extends Error {
  constructor(sessionId: number, epoch: number) {
    super(`session ${sessionId} was taken over by another process (lease ${epoch} is no longer current)`);
    this.name = 'Fenced';
  }
}

/**
 * Takes a session's lease: raises its epoch and returns the new one (null: no such session). The
 * UPDATE waits for the row lock of a write in flight, so every row stored under the old lease is
 * committed before this returns, and every later write under it fails (Fenced).
 */
export async function claimLease(sessionId: number): Promise<number | null> {
  return db().transaction(async (tx) => {
    const [res] = await tx
      .update(sessions)
      .set({ leaseEpoch: sql`${sessions.leaseEpoch} + 1` })
      .where(eq(sessions.id, sessionId));
    if (res.affectedRows !== 1) return null;
    const [row] = await tx.select({ epoch: sessions.leaseEpoch }).from(sessions).where(eq(sessions.id, sessionId));
    return row?.epoch ?? null;
  });
}

/** A session's stored sequence number and lease epoch: what an in-memory copy is checked against. */
export async function leaseOf(w: Writer, sessionId: number): Promise<{ seq: number; epoch: number } | null> {
  const [row] = await w.select({ seq: sessions.seq, epoch: sessions.leaseEpoch }).from(sessions).where(eq(sessions.id, sessionId));
  return row ?? null;
}

/** the highest sequence number among the rows a batch of effects stores */
function lastSeqOf(effects: readonly Effect[]): number {
  let seq = 0;
  for (const e of effects) {
    if (e.type === 'persist-choice' || e.type === 'persist-participant' || e.type === 'persist-log') seq = Math.max(seq, e.row.seq);
  }
  return seq;
}

/**
 * Writes persist-* effects (one step's, or a batch of steps'), in the caller's transaction.
 *
 * With `claim` (the live runner): first `UPDATE sessions SET seq = to WHERE id AND seq = from`
 * (and, with `epoch`, `AND lease_epoch = epoch`) — one statement that both checks that nobody
 * wrote since `from` and locks the session row until the transaction ends; no row matched →
 * Fenced when the lease moved on, else StaleState. Without it (seeds, tests writing a whole
 * simulated run), the session's seq is moved up to the last row written.
 * A duplicate (session, seq) key still throws: the unique keys stay the last safety net.
 * `userId` is who caused the log rows (a persist-log effect's own `by` wins, for batches).
 */
export async function writeEffects(
  w: Writer,
  sessionId: number,
  effects: readonly Effect[],
  userId: number | null = null,
  opts: { claim?: { from: number; to: number; epoch?: number } } = {},
) {
  if (opts.claim) {
    const { from, to, epoch } = opts.claim;
    const [res] = await w
      .update(sessions)
      .set({ seq: to })
      .where(and(eq(sessions.id, sessionId), eq(sessions.seq, from), epoch === undefined ? undefined : eq(sessions.leaseEpoch, epoch)));
    if (res.affectedRows !== 1) {
      const now = await leaseOf(w, sessionId);
      if (epoch !== undefined && now && now.epoch !== epoch) throw new Fenced(sessionId, epoch);
      throw new StaleState(sessionId, from);
    }
  } else {
    const last = lastSeqOf(effects);
    if (last > 0)
      await w
        .update(sessions)
        .set({ seq: sql`GREATEST(${sessions.seq}, ${last})` })
        .where(eq(sessions.id, sessionId));
  }
  const choiceRows: (typeof choices.$inferInsert)[] = [];
  for (const e of effects) {
    switch (e.type) {
      case 'persist-choice':
        choiceRows.push(choiceInsert(sessionId, e.row));
        break;
      case 'persist-participant':
        await w.insert(sessionParticipants).values({
          sessionId,
          userId: userIdOf(e.row.id),
          participantKey: e.row.id,
          pseudonym: e.row.pseudonym,
          seq: e.row.seq,
          joinedAtMs: e.row.joinedAt,
        });
        break;
      case 'persist-log':
        await w
          .insert(sessionLog)
          .values({ sessionId, seq: e.row.seq, atMs: e.row.at, event: e.row.event, userId: e.by === undefined ? userId : e.by });
        break;
      case 'persist-session': {
        const at = new Date(e.at);
        await w
          .update(sessions)
          .set({
            status: e.status,
            currentSupergame: e.supergame,
            ...(e.status === 'complete' ? { completedAt: at } : {}),
          })
          .where(eq(sessions.id, sessionId));
        if (e.status === 'running') {
          // the first start only; resume also reports 'running'
          await w
            .update(sessions)
            .set({ startedAt: sql`COALESCE(${sessions.startedAt}, ${at})` })
            .where(eq(sessions.id, sessionId));
        }
        break;
      }
      case 'persist-draws':
        if (e.supergames.length) {
          await w
            .insert(supergameDraws)
            .values(
              e.supergames.map((s) => ({
                sessionId,
                supergame: s.supergame,
                draws: s.draws,
                length: s.length,
                roundsPlayed: s.roundsPlayed,
              })),
            )
            .onDuplicateKeyUpdate({ set: { length: sql`length` } });
        }
        break;
      case 'persist-matching':
        if (e.pairs.length) {
          const supergame = e.matching.supergame;
          await w
            .insert(sessionPairs)
            .values(
              e.pairs.map((p) => ({
                sessionId,
                supergame,
                pairId: p.pairId,
                seat0: p.participants[0],
                seat1: p.participants[1],
                computerStrategy: p.computerStrategy,
              })),
            )
            .onDuplicateKeyUpdate({ set: { pairId: sql`pair_id` } });
        }
        break;
      default:
        break;
    }
  }
  if (choiceRows.length) await w.insert(choices).values(choiceRows);
}

function choiceInsert(sessionId: number, r: StoredChoice): typeof choices.$inferInsert {
  return {
    sessionId,
    seq: r.seq,
    supergame: r.supergame,
    round: r.round,
    pairId: r.pairId,
    seat: r.seat,
    participantKey: r.participantId,
    action: r.action,
    source: r.source,
    strategy: r.strategy,
    clientChoiceId: r.clientChoiceId,
    atMs: r.at,
    decisionMs: r.decisionMs,
  };
}

/** The session the runner keeps live (app/models/session-row.server.ts). */
export type StoredSession = Session;

export async function getSession(sessionId: number): Promise<StoredSession | null> {
  const [s] = await db().select(sessionColumns).from(sessions).where(eq(sessions.id, sessionId));
  return s ? toSession(s) : null;
}

/** Every stored row of a session, in the engine's shapes. */
export async function loadRows(sessionId: number) {
  const [p, c, l] = await Promise.all([
    db().select().from(sessionParticipants).where(eq(sessionParticipants.sessionId, sessionId)).orderBy(asc(sessionParticipants.seq)),
    db().select().from(choices).where(eq(choices.sessionId, sessionId)).orderBy(asc(choices.seq)),
    db().select().from(sessionLog).where(eq(sessionLog.sessionId, sessionId)).orderBy(asc(sessionLog.seq)),
  ]);
  const participants: ParticipantRow[] = p.map((r) => ({
    id: r.participantKey,
    pseudonym: r.pseudonym,
    joinedAt: r.joinedAtMs,
    seq: r.seq,
  }));
  const choiceRows: StoredChoice[] = c.map((r) => ({
    sessionId: String(sessionId),
    seq: r.seq,
    supergame: r.supergame,
    round: r.round,
    pairId: r.pairId,
    seat: r.seat as 0 | 1,
    participantId: r.participantKey,
    action: r.action,
    source: r.source,
    strategy: r.strategy,
    clientChoiceId: r.clientChoiceId,
    at: r.atMs,
    decisionMs: r.decisionMs,
  }));
  const logs: LogRow[] = l.map((r) => ({ seq: r.seq, at: r.atMs, event: r.event as LogRow['event'] }));
  return { participants, choices: choiceRows, logs };
}

/** The engine state of a session, rebuilt from its stored rows. */
export async function rebuildSession(session: StoredSession): Promise<EngineState> {
  const rows = await loadRows(session.id);
  return rebuild(session.design, session.seed, rows.participants, rows.choices, rows.logs, { sessionId: String(session.id) });
}
