// The socket.io hub: authenticates every socket with the sign-in cookie the pages use, validates
// every payload with zod, checks the caller's role, hands events to the session runner, and
// acknowledges. Created once, in server.ts. In cluster mode (REDIS_URL, realtime/cluster.ts) the
// session-side part of each event runs on the session's owner, wherever the socket is connected.
import type { Server as HttpServer } from 'node:http';
import { eq } from 'drizzle-orm';
import { Server, type Socket } from 'socket.io';
import type { z } from 'zod';
import { LIBRARY } from '#app/lib/automata';
import { computerStrategyOf } from '#app/lib/design';
import { isAdminEmail, signedInFromCookie } from '#app/utils/auth.server';
import { db } from '#app/utils/db.server';
import { env } from '#app/utils/env.server';
import { allowSocketOrigin } from '#app/utils/origin.server';
import { courseRoleOf } from '#app/utils/permissions.server';
import type { CourseRole } from '#app/utils/roles';
import { setRunner } from '#app/utils/runner.server';
import { setSocketControl } from '#app/utils/sockets.server';
import { users } from '#drizzle/schema';
import { Cluster, type HubServer, type InterServerEvents, type OwnerHandlers, type OwnerOp, type OwnerOps } from './cluster';
import { roomOf } from './engine/engine';
import type { EngineEvent } from './engine/types';
import { bigScreenView, floorView, participantView } from './engine/views';
import {
  type Ack,
  type AckData,
  type AckErrorCode,
  type ClientEvent,
  type ClientToServerEvents,
  EVENT_PAYLOADS,
  type InputOf,
  type ServerToClientEvents,
  type SocketData,
  UNAUTHORIZED,
} from './protocol';
import { EventLimiter } from './rate-limit';
import { SessionMoved, SessionRunner } from './runner';
import { StorageUnavailable } from './storage-health';

type HubSocket = Socket<ClientToServerEvents, ServerToClientEvents, InterServerEvents, SocketData>;

class Refusal extends Error {
  constructor(
    readonly code: AckErrorCode,
    message: string,
  ) {
    super(message);
  }
}

/** Runs `run` and turns its refusals into the failure acknowledgement (anything else: server-error). */
async function answered<T>(run: () => Promise<T>): Promise<Ack<T>> {
  try {
    return { ok: true, data: await run() };
  } catch (error) {
    if (error instanceof Refusal || error instanceof StorageUnavailable || error instanceof SessionMoved)
      return { ok: false, code: error.code, message: error.message };
    console.error('[parley] socket handler failed', error);
    return { ok: false, code: 'server-error', message: 'Something went wrong on the server.' };
  }
}

/** The data of a successful acknowledgement; a failure is thrown again as the same refusal. */
function unwrap<T>(ack: Ack<T>): T {
  if (!ack.ok) throw new Refusal(ack.code, ack.message);
  return ack.data;
}

/** `redisUrl`: cluster mode (socket.io's Redis adapter, one owner per session); absent: one process. */
export async function attachHub(httpServer: HttpServer, opts: { redisUrl?: string } = {}) {
  const io: HubServer = new Server<ClientToServerEvents, ServerToClientEvents, InterServerEvents, SocketData>(httpServer, {
    serveClient: false,
    // Pages of another origin on the same site would otherwise connect with the user's cookie.
    allowRequest: allowSocketOrigin(env().APP_URL),
    // Every payload is a few hundred bytes; socket.io's default (1 MB) would let one message hold a megabyte.
    maxHttpBufferSize: 32 * 1024,
  });
  // In cluster mode a room's listeners may be on any process: the owner always sends (the adapter
  // carries it to every process), since asking every process who listens would cost more.
  const clustered = Boolean(opts.redisUrl);
  const runner = new SessionRunner({
    listening: (room) => clustered || (io.sockets.adapter.rooms.get(room)?.size ?? 0) > 0,
    view: (room, view) => {
      const to = io.to(room);
      if (view.kind === 'participant') to.emit('view:participant', view);
      else if (view.kind === 'floor') to.emit('view:floor', view);
      else to.emit('view:big-screen', view);
    },
    storage: (ok) => io.emit('storage:status', { ok }),
  });
  setRunner(runner);
  const cluster = opts.redisUrl ? await Cluster.start(io, runner, opts.redisUrl) : null;

  // Every socket belongs to one server-side sign-in; its rooms let a sign-out, a removal or a role
  // change close it at once (the client reconnects and is authorised afresh, or refused).
  const userRoom = (userId: number) => `user:${userId}`;
  const authRoom = (authKey: string) => `auth:${authKey}`;
  setSocketControl({
    dropAuthSession: (authKey) => io.in(authRoom(authKey)).disconnectSockets(true),
    dropUser: (userId) => io.in(userRoom(userId)).disconnectSockets(true),
  });

  io.use(async (socket, next) => {
    try {
      const signedIn = await signedInFromCookie(socket.handshake.headers.cookie);
      if (!signedIn) return next(new Error(UNAUTHORIZED));
      socket.data.userId = signedIn.userId;
      socket.data.authKey = signedIn.authKey;
      next();
    } catch {
      next(new Error(UNAUTHORIZED));
    }
  });

  /** The caller's role in the course of a session (site admins act as instructors). */
  async function roleFor(userId: number, courseId: number): Promise<CourseRole | null> {
    const [u] = await db().select({ email: users.email }).from(users).where(eq(users.id, userId));
    return courseRoleOf(courseId, { id: userId, isAdmin: Boolean(u && isAdminEmail(u.email)) });
  }

  async function sessionFor(sessionId: number) {
    const session = await runner.sessionOf(sessionId);
    if (!session) throw new Refusal('not-found', 'There is no such session.');
    return session;
  }

  async function requireStaff(userId: number, sessionId: number, roles: readonly CourseRole[]) {
    const session = await sessionFor(sessionId);
    const role = await roleFor(userId, session.courseId);
    if (!role || !roles.includes(role)) throw new Refusal('forbidden', 'Your role in this course does not allow this.');
    return { session, role };
  }

  /**
   * The session-side part of every session event: the role checks and the runner. Runs on the
   * session's owner (this process, or another one that received it through the adapter); the
   * socket-side part (rooms, the set of sessions a socket plays in) stays with the socket.
   */
  const owned: OwnerHandlers = {
    'session:watch': (userId, { sessionId, as }) =>
      answered(async () => {
        if (userId === null) throw new Refusal('unauthorized', 'Sign in first.');
        const me = String(userId);
        if (as === 'participant') {
          const session = await sessionFor(sessionId);
          const state = await runner.state(sessionId);
          if (!state?.participants[me]) throw new Refusal('not-a-participant', 'You have not joined this session.');
          // In a roster session, a member removed from the course keeps no seat, whatever the
          // session's state says. (Open sessions admit people who are not members.)
          if (session.admission === 'roster' && !(await roleFor(userId, session.courseId))) {
            throw new Refusal('forbidden', 'You are no longer a member of this course.');
          }
          let res = await runner.dispatch(sessionId, { type: 'reconnect', participantId: me });
          // Handed to a computer while away, now back: plays again from the next supergame.
          if (res.state.participants[me]?.status === 'handed' && (res.state.status === 'running' || res.state.status === 'paused')) {
            const back = await runner.dispatch(sessionId, { type: 'join', participantId: me });
            if (!back.error) res = back;
          }
          return participantView(res.state, me);
        }
        await requireStaff(userId, sessionId, as === 'floor' ? ['instructor', 'assistant'] : ['instructor', 'assistant', 'researcher']);
        const state = (await runner.state(sessionId))!;
        return as === 'floor' ? floorView(state, Date.now()) : bigScreenView(state);
      }),

    'choice:submit': (userId, c) =>
      answered(async () => {
        if (userId === null) throw new Refusal('unauthorized', 'Sign in first.');
        await sessionFor(c.sessionId);
        const res = await runner.dispatch(c.sessionId, {
          type: 'choose',
          participantId: String(userId),
          supergame: c.supergame,
          round: c.round,
          action: c.action,
          clientChoiceId: c.clientChoiceId,
        });
        if (res.error) {
          // A retry of a stored choice (double tap, resend after reconnect): the same answer again.
          if (res.error.code === 'already-chosen' && res.row?.clientChoiceId === c.clientChoiceId) return res.row;
          throw new Refusal(res.error.code, res.error.message);
        }
        return res.row!;
      }),

    'session:control': (userId, { sessionId, command }) =>
      answered(async () => {
        if (userId === null) throw new Refusal('unauthorized', 'Sign in first.');
        // product.md "Roles": assistants may pause and resume only.
        const roles: readonly CourseRole[] = command === 'pause' || command === 'resume' ? ['instructor', 'assistant'] : ['instructor'];
        await requireStaff(userId, sessionId, roles);
        const event: EngineEvent =
          command === 'end-after-supergame'
            ? { type: 'endAfterSupergame' }
            : command === 'end-now'
              ? { type: 'endNow' }
              : { type: command };
        const res = await runner.dispatch(sessionId, event, { userId });
        if (res.error) throw new Refusal(res.error.code, res.error.message);
        return { status: res.state.status };
      }),

    'participant:act': (userId, { sessionId, participantId, action, strategy }) =>
      answered(async () => {
        if (userId === null) throw new Refusal('unauthorized', 'Sign in first.');
        const { session } = await requireStaff(userId, sessionId, action === 'remove' ? ['instructor'] : ['instructor', 'assistant']);
        const state = (await runner.state(sessionId))!;
        if (!state.participants[participantId]) throw new Refusal('not-a-participant', 'No such participant in this session.');
        // Nudge and hand-over act on rounds being played; a lobby participant may only be removed.
        if (action !== 'remove' && state.status !== 'running' && state.status !== 'paused') {
          throw new Refusal(
            'session-not-running',
            `The session is ${state.status === 'complete' ? 'over' : 'not running'}: there is no round to choose in.`,
          );
        }
        if (action === 'nudge') {
          io.to(roomOf('participant', String(sessionId), participantId)).emit('participant:nudge', {
            message: 'Your partner is waiting: please choose.',
          });
          return { done: true };
        }
        const fallback = computerStrategyOf(session.design);
        const chosen = strategy ?? fallback;
        if (!LIBRARY.some((a) => a.id === chosen)) throw new Refusal('unknown-strategy', `No library strategy ${chosen}.`);
        const res = await runner.dispatch(
          sessionId,
          action === 'remove' ? { type: 'remove', participantId } : { type: 'handToComputer', participantId, strategy: chosen },
          { userId },
        );
        if (res.error) throw new Refusal(res.error.code, res.error.message);
        return { done: true };
      }),

    dispatch: (userId, { sessionId, event }) =>
      answered(async () => {
        const res = await runner.dispatch(sessionId, event, { userId });
        return { error: res.error ?? null };
      }),
  };
  cluster?.serve(owned);

  /** The session-side part on the session's owner (in one process: here). */
  function atOwner<K extends OwnerOp>(op: K, sessionId: number, userId: number, input: OwnerOps[K]['input']) {
    return cluster ? cluster.atOwner(op, sessionId, userId, input) : owned[op](userId, input);
  }

  io.on('connection', (socket) => {
    const userId = socket.data.userId;
    const me = String(userId);
    void socket.join([userRoom(userId), authRoom(socket.data.authKey)]);
    if (!runner.health.ok) socket.emit('storage:status', { ok: false });
    /** sessions this socket plays in, to report its connection state */
    const playing = new Set<number>();
    // Before handle(): a flood is answered `rate-limited` without validating or running anything.
    socket.use(rateLimit(new EventLimiter()));

    /** Every event is registered here, so each handler's result is checked against its ack type. */
    const on = <E extends ClientEvent>(event: E, run: (input: InputOf<E>) => Promise<AckData[E]>) =>
      listen(socket, event, (args) => handle(event, args, run));

    on('me:get', async () => ({ userId }));

    on('session:watch', async (input) => {
      const { sessionId, as } = input;
      if (as === 'participant') {
        // Its own room only (nothing of anyone else's is sent there): joined before the owner
        // answers, so no view sent in between is missed; left again on a refusal.
        const room = roomOf('participant', String(sessionId), me);
        await socket.join(room);
        try {
          const view = unwrap(await atOwner('session:watch', sessionId, userId, input));
          playing.add(sessionId);
          return view;
        } catch (error) {
          if (!playing.has(sessionId)) await socket.leave(room);
          throw error;
        }
      }
      const view = unwrap(await atOwner('session:watch', sessionId, userId, input));
      await socket.join(roomOf(as === 'floor' ? 'staff' : 'session', String(sessionId)));
      return view;
    });

    on('choice:submit', async (c) => {
      // Only a socket that was admitted to this session as a participant (session:watch checks
      // membership) may choose; a removal closes the socket, so its replacement must ask again.
      if (!playing.has(c.sessionId)) throw new Refusal('forbidden', 'Open the session on this device first.');
      return unwrap(await atOwner('choice:submit', c.sessionId, userId, c));
    });

    on('session:control', async (input) => unwrap(await atOwner('session:control', input.sessionId, userId, input)));

    on('participant:act', async (input) => unwrap(await atOwner('participant:act', input.sessionId, userId, input)));

    socket.on('disconnect', () => {
      for (const sessionId of playing) {
        void atOwner('dispatch', sessionId, userId, { sessionId, event: { type: 'disconnect', participantId: me } }).catch(() => undefined);
      }
    });
  });

  return { io, runner, cluster };
}

/** socket.io middleware: every incoming event passes here first; over its bucket it is refused. */
function rateLimit(limiter: EventLimiter) {
  return ([event, ...args]: unknown[], next: (err?: Error) => void) => {
    if (limiter.allow(String(event))) return next();
    const ack = args.at(-1);
    if (typeof ack === 'function') {
      (ack as (res: Ack<never>) => void)({
        ok: false,
        code: 'rate-limited',
        message: 'Too many requests at once: wait a moment and try again.',
      });
    }
  };
}

/**
 * The payload schemas as a table indexed by event: the same objects as EVENT_PAYLOADS, typed so
 * that `SCHEMAS[event]` for a generic event yields that event's input type (TypeScript checks
 * each entry here, where the event is known).
 */
const SCHEMAS: { [E in ClientEvent]: z.ZodType<InputOf<E>> } = EVENT_PAYLOADS;

/**
 * socket.io calls a listener with whatever the client sent: the payload, any extra arguments, and
 * the acknowledgement callback last (if the client asked for one). The listener takes them as
 * they come; handle() decides what they mean.
 */
function listen(socket: HubSocket, event: ClientEvent, listener: (args: unknown[]) => void) {
  socket.on(event, (...args: unknown[]) => listener(args));
}

/**
 * Validate, run, acknowledge: every event goes through here so no payload skips zod. The ack is
 * the last argument when it is a function (an extra argument before it must not hide it); an
 * event with more than a payload and an ack is answered `bad-payload` and runs nothing.
 */
async function handle<E extends ClientEvent>(event: E, args: unknown[], run: (input: InputOf<E>) => Promise<AckData[E]>) {
  const last = args.at(-1);
  if (typeof last !== 'function') return;
  const reply = (res: Ack<AckData[E]>) => {
    last(res);
  };
  const rest = args.slice(0, -1);
  if (rest.length > 1) {
    reply({ ok: false, code: 'bad-payload', message: `${event} takes one payload; ${rest.length} arguments were sent.` });
    return;
  }
  const parsed = SCHEMAS[event].safeParse(rest[0] ?? {});
  if (!parsed.success) {
    reply({
      ok: false,
      code: 'bad-payload',
      message: parsed.error.issues.map((i) => `${i.path.join('.') || 'payload'}: ${i.message}`).join('; '),
    });
    return;
  }
  reply(await answered(() => run(parsed.data)));
}
