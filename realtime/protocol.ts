// The socket contract shared by the hub and the browser: event names `entity:verb`, payloads
// validated with zod, every acknowledgement `{ ok: true, data } | { ok: false, code, message }`.
// One table per direction: EVENT_PAYLOADS (what the hub validates) and AckData (what it answers);
// ClientToServerEvents is made from both, so the hub's handlers and the browser's calls are
// checked against the same declaration.
import { z } from 'zod';
import type { BigScreenView, ErrorCode, FloorView, ParticipantView, SessionStatus, StoredChoice } from './engine/types';

/**
 * `rate-limited`: the socket sent this kind of event faster than realtime/rate-limit.ts allows.
 * `unavailable`: the database did not answer within a short bound (a stall or an outage). The
 * choice may or may not be stored: the phone keeps it and sends it again with the same client
 * choice id, which returns the stored row if it was.
 */
export const ACK_ERROR_CODES = [
  'bad-payload',
  'unauthorized',
  'forbidden',
  'not-found',
  'server-error',
  'rate-limited',
  'unavailable',
] as const;
export type AckErrorCode = (typeof ACK_ERROR_CODES)[number] | ErrorCode;

export type AckFailure = { ok: false; code: AckErrorCode; message: string };
export type Ack<T> = { ok: true; data: T } | AckFailure;

const SessionId = z.number().int().positive();

export const MeGet = z.object({}).strict();

/** Subscribe this socket to a session's view: the participant's own, the floor, or the big screen. */
export const SessionWatch = z
  .object({
    sessionId: SessionId,
    as: z.enum(['participant', 'floor', 'big-screen']),
  })
  .strict();

export const ChoiceSubmit = z
  .object({
    sessionId: SessionId,
    supergame: z.number().int().min(1),
    round: z.number().int().min(1),
    action: z.enum(['C', 'D']),
    /** made by the phone once per round; a retry with the same id returns the same row */
    clientChoiceId: z.string().min(8).max(64),
  })
  .strict();

export const SESSION_COMMANDS = ['start', 'pause', 'resume', 'end-after-supergame', 'end-now', 'cancel'] as const;
export const SessionControl = z
  .object({
    sessionId: SessionId,
    command: z.enum(SESSION_COMMANDS),
  })
  .strict();

export const ParticipantAction = z
  .object({
    sessionId: SessionId,
    participantId: z.string().min(1).max(32),
    action: z.enum(['nudge', 'hand-to-computer', 'remove']),
    /** for hand-to-computer: the library strategy that takes the seat */
    strategy: z.string().max(24).optional(),
  })
  .strict();

/** Each event's payload schema: the hub validates with it; the browser's payload type is its input. */
export const EVENT_PAYLOADS = {
  'me:get': MeGet,
  'session:watch': SessionWatch,
  'choice:submit': ChoiceSubmit,
  'session:control': SessionControl,
  'participant:act': ParticipantAction,
} as const;

export type ClientEvent = keyof typeof EVENT_PAYLOADS;
/** What the browser sends with an event. */
export type PayloadOf<E extends ClientEvent> = z.input<(typeof EVENT_PAYLOADS)[E]>;
/** What a handler receives: the payload after validation. */
export type InputOf<E extends ClientEvent> = z.output<(typeof EVENT_PAYLOADS)[E]>;

/** The view `session:watch` answers with: tagged by `kind`, the same view its broadcasts carry. */
export type WatchedView = ParticipantView | FloorView | BigScreenView;

/**
 * Whether a client should show `next` in place of `shown`: not when it is older (a lower `seq`)
 * than the view it shows of the same session. In a cluster the views of a session that just
 * changed owner may arrive out of order; an older one would put a phone back on a round it has
 * answered. Equal `seq`s are taken (connection states change without a stored row).
 */
export function supersedes(next: Pick<WatchedView, 'sessionId' | 'seq'>, shown: Pick<WatchedView, 'sessionId' | 'seq'> | null): boolean {
  return !shown || shown.sessionId !== next.sessionId || next.seq >= shown.seq;
}

/** What each event's acknowledgement carries on success. */
export interface AckData {
  'me:get': { userId: number };
  'session:watch': WatchedView;
  /** the stored choice (a retry with the same client choice id gets the same row) */
  'choice:submit': StoredChoice;
  'session:control': { status: SessionStatus };
  'participant:act': { done: true };
}

export type ClientToServerEvents = {
  [E in ClientEvent]: (payload: PayloadOf<E>, ack: (res: Ack<AckData[E]>) => void) => void;
};

export interface ServerToClientEvents {
  'view:participant': (view: ParticipantView) => void;
  'view:floor': (view: FloorView) => void;
  'view:big-screen': (view: BigScreenView) => void;
  /** staff asked this participant to choose */
  'participant:nudge': (payload: { message: string }) => void;
  /**
   * Sent to every socket when the server loses (ok: false) or regains (ok: true) its database, and
   * to a socket on connect while it is lost: phones say "reconnecting" and keep their choices.
   */
  'storage:status': (payload: { ok: boolean }) => void;
}

export interface SocketData {
  userId: number;
  /** the server-side sign-in this socket came in with (auth_sessions id) */
  authKey: string;
}

/** Error sent with a refused handshake (socket.io `connect_error`). */
export const UNAUTHORIZED = 'unauthorized';
