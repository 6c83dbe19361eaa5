// The socket contract shared by the hub and the browser: event names `entity:verb`, payloads
// validated with zod, every acknowledgement `{ ok: true, data } | { ok: false, code, message }`.
import { z } from 'zod';
import type { BigScreenView, StoredChoice, ErrorCode, FloorView, ParticipantView } from './engine/types';

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

export type Ack<T> = { ok: true; data: T } | { ok: false; code: AckErrorCode; message: string };

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

export interface ClientToServerEvents {
  'me:get': (payload: z.input<typeof MeGet>, ack: (res: Ack<{ userId: number }>) => void) => void;
  'session:watch': (payload: z.input<typeof SessionWatch>, ack: (res: Ack<ParticipantView | FloorView | BigScreenView>) => void) => void;
  'choice:submit': (payload: z.input<typeof ChoiceSubmit>, ack: (res: Ack<StoredChoice>) => void) => void;
  'session:control': (payload: z.input<typeof SessionControl>, ack: (res: Ack<{ status: string }>) => void) => void;
  'participant:act': (payload: z.input<typeof ParticipantAction>, ack: (res: Ack<{ done: true }>) => void) => void;
}

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
