/**
 * The phone's outbox (issue 12, bug 1): a tap is never lost while its round is open. The choice
 * is kept with its client choice id, for one session, supergame and round, in sessionStorage
 * (it survives a reload, and dies with the tab), sent whenever the phone is connected, sent
 * again after answers that leave the outcome open, and dropped only on a definitive answer or
 * once the round is over. A resend carries the same client choice id, so the server stores one
 * row at most and answers a repeat with that row.
 */
import type { Action } from '#app/lib/automata';
import type { Ack, AckErrorCode } from '#realtime/protocol';
import type { StoredChoice } from '#realtime/engine/types';

export interface OutboxEntry {
  sessionId: number;
  supergame: number;
  round: number;
  action: Action;
  clientChoiceId: string;
}

/**
 * What to do with a choice after the server's answer.
 * - stored: acknowledged (a repeat of a stored choice is acknowledged with the stored row too);
 * - retry: the outcome is open or the server could not take it now: send again, later;
 * - closed: the round was over before the choice arrived;
 * - taken: another choice is already recorded for this round;
 * - refused: any other answer, which sending again would not change.
 */
export type Outcome = 'stored' | 'retry' | 'closed' | 'taken' | 'refused';

const RETRY: readonly AckErrorCode[] = [
  // the database did not answer in time: the row may or may not exist (realtime/protocol.ts)
  'unavailable',
  // no answer at all (a dropped connection, a crash): the same
  'server-error',
  'rate-limited',
  // the socket had not been admitted to the session yet (a reconnect racing its watch)
  'forbidden',
  // paused: the round stays open and takes the choice once the session runs again
  'session-not-running',
];

export function outcomeOf(res: Ack<StoredChoice>): Outcome {
  if (res.ok) return 'stored';
  if (RETRY.includes(res.code)) return 'retry';
  if (res.code === 'round-closed') return 'closed';
  if (res.code === 'already-chosen') return 'taken';
  return 'refused';
}

/**
 * Wait before the n-th resend (n from 0): 1, 2, 4, 8 s, then 8 s, each stretched by up to half
 * at random so that a room of phones that lost the server at once does not come back in step.
 */
export function backoffMs(attempt: number, random: () => number = Math.random): number {
  const base = Math.min(8000, 1000 * 2 ** Math.max(0, attempt));
  return Math.round(base * (1 + random() / 2));
}

export const sameRound = (e: Pick<OutboxEntry, 'supergame' | 'round'>, supergame: number, round: number | null) =>
  e.supergame === supergame && e.round === round;

const keyOf = (sessionId: number) => `parley:outbox:${sessionId}`;

/** The kept choice of this session, if any (sessionStorage can be missing or refuse: then none). */
export function loadOutbox(sessionId: number, storage: Storage | undefined = globalThis.sessionStorage): OutboxEntry | null {
  try {
    const raw = storage?.getItem(keyOf(sessionId));
    if (!raw) return null;
    const e = JSON.parse(raw) as Partial<OutboxEntry>;
    const valid =
      e.sessionId === sessionId &&
      Number.isInteger(e.supergame) &&
      Number.isInteger(e.round) &&
      (e.action === 'C' || e.action === 'D') &&
      typeof e.clientChoiceId === 'string' &&
      e.clientChoiceId.length >= 8;
    return valid ? (e as OutboxEntry) : null;
  } catch {
    return null;
  }
}

export function saveOutbox(sessionId: number, entry: OutboxEntry | null, storage: Storage | undefined = globalThis.sessionStorage) {
  try {
    if (entry) storage?.setItem(keyOf(sessionId), JSON.stringify(entry));
    else storage?.removeItem(keyOf(sessionId));
  } catch {
    // Private browsing or a full storage: the outbox still lives in memory for this page.
  }
}

/** A client choice id: made once per round, so that every resend is recognised as the same tap. */
export function newChoiceId() {
  return `${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 10)}`;
}
