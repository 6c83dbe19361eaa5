// The socket contract shared by the hub and the browser: event names `entity:verb`, payloads
// validated with zod, every acknowledgement `{ ok: true, data } | { ok: false, code, message }`.
import { z } from 'zod';

export type Ack<T> = { ok: true; data: T } | { ok: false; code: AckErrorCode; message: string };

export const ACK_ERROR_CODES = ['bad-payload', 'unauthorized', 'forbidden', 'not-found', 'server-error'] as const;
export type AckErrorCode = (typeof ACK_ERROR_CODES)[number];

export const MeGet = z.object({}).strict();

export interface ClientToServerEvents {
  'me:get': (payload: z.input<typeof MeGet>, ack: (res: Ack<{ userId: number }>) => void) => void;
}

// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface ServerToClientEvents {}

export interface SocketData {
  userId: number;
}

/** Error sent with a refused handshake (socket.io `connect_error`). */
export const UNAUTHORIZED = 'unauthorized';
