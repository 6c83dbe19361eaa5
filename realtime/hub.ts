// The socket.io hub: authenticates every socket with the sign-in cookie the pages use, validates
// every payload, answers with an acknowledgement. Created once, in server.ts.
import type { Server as HttpServer } from 'node:http';
import { Server, type Socket } from 'socket.io';
import type { z } from 'zod';
import { userIdFromCookie } from '#app/utils/auth.server';
import {
  type Ack,
  type ClientToServerEvents,
  MeGet,
  type ServerToClientEvents,
  type SocketData,
  UNAUTHORIZED,
} from './protocol';

export type HubSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

export function attachHub(httpServer: HttpServer) {
  const io = new Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>(httpServer, {
    serveClient: false,
  });

  io.use(async (socket, next) => {
    try {
      const userId = await userIdFromCookie(socket.handshake.headers.cookie);
      if (userId === null) return next(new Error(UNAUTHORIZED));
      socket.data.userId = userId;
      next();
    } catch {
      next(new Error(UNAUTHORIZED));
    }
  });

  io.on('connection', (socket) => {
    socket.on('me:get', (payload, ack) => {
      handle(MeGet, payload, ack, async () => ({ userId: socket.data.userId }));
    });
  });

  return io;
}

/** Validate, run, acknowledge: every event goes through here so no payload skips zod. */
async function handle<S extends z.ZodType, T>(schema: S, payload: unknown, ack: unknown, run: (input: z.output<S>) => Promise<T>) {
  if (typeof ack !== 'function') return;
  const reply = ack as (res: Ack<T>) => void;
  const parsed = schema.safeParse(payload ?? {});
  if (!parsed.success) {
    reply({ ok: false, code: 'bad-payload', message: parsed.error.issues.map((i) => `${i.path.join('.') || 'payload'}: ${i.message}`).join('; ') });
    return;
  }
  try {
    reply({ ok: true, data: await run(parsed.data) });
  } catch (error) {
    console.error('[parley] socket handler failed', error);
    reply({ ok: false, code: 'server-error', message: 'Something went wrong on the server.' });
  }
}
