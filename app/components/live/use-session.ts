import { useCallback, useEffect, useRef, useState } from 'react';
import { io, type Socket } from 'socket.io-client';
import { type AckFailure, type ClientToServerEvents, type ServerToClientEvents, supersedes, type WatchedView } from '#realtime/protocol';

export type LiveSocket = Socket<ServerToClientEvents, ClientToServerEvents>;
/** The view of one kind: `kind` tags every view, so a page watching as floor or big screen narrows by it. */
export type ViewOf<K extends WatchedView['kind']> = Extract<WatchedView, { kind: K }>;
/** The socket with an acknowledgement deadline: `emitWithAck` rejects when no answer comes in time. */
export type TimedSocket = ReturnType<LiveSocket['timeout']>;
/**
 * Send one event and wait for its acknowledgement: `ask((s) => s.emitWithAck('session:control', payload))`.
 * The event name is written at the call, so socket.io's types give the payload and the answer
 * their protocol types. Never rejects: not connected, or no answer in time, is a failed ack.
 */
export type Ask = <T>(send: (socket: TimedSocket) => Promise<T>) => Promise<T | AckFailure>;

const ACK_WAIT_MS = 8000;
/** A watch refused with one of these is asked again after WATCH_RETRY_MS. */
const RETRY_WATCH: ReadonlySet<string> = new Set(['unavailable', 'server-error', 'rate-limited']);
const WATCH_RETRY_MS = 1000;
const isKind = <K extends WatchedView['kind']>(view: WatchedView, kind: K): view is ViewOf<K> => view.kind === kind;

/**
 * The live view of a session over socket.io: connects with the sign-in cookie, watches the
 * session as participant, floor or big screen, and watches again after every reconnect (a phone
 * that slept gets its full current view back).
 *
 * `ready` is true once this connection's watch was answered: the hub takes a participant's
 * choice only on a socket it admitted that way. `online` is the browser's own network switch
 * (it flips at once, while a dead socket can take seconds to notice), and `storageOk` is false
 * while the server has lost its database ('storage:status'): the phone treats both like a lost
 * connection.
 */
export function useSessionView<K extends WatchedView['kind']>(sessionId: number, as: K, initial: ViewOf<K> | null) {
  const [view, setView] = useState<ViewOf<K> | null>(initial);
  const [connected, setConnected] = useState(false);
  const [ready, setReady] = useState(false);
  const [online, setOnline] = useState(true);
  const [storageOk, setStorageOk] = useState(true);
  const [error, setError] = useState<string | null>(null);
  const socketRef = useRef<LiveSocket | null>(null);

  useEffect(() => {
    const socket: LiveSocket = io({ transports: ['websocket'], reconnectionDelayMax: 4000 });
    socketRef.current = socket;
    let retry: ReturnType<typeof setTimeout> | undefined;
    // Never back in time: an older view of the session than the one shown is dropped.
    const show = (v: ViewOf<K>) => setView((shown) => (supersedes(v, shown) ? v : shown));
    const watch = () => {
      clearTimeout(retry);
      socket.emit('session:watch', { sessionId, as }, (res) => {
        if (!res.ok) {
          // A refusal that passes (a server restarting, a session changing servers, a burst over
          // the rate limit): ask again in a second, or the phone would wait for a view that never comes.
          if (RETRY_WATCH.has(res.code)) retry = setTimeout(() => socket.connected && watch(), WATCH_RETRY_MS);
          return setError(res.message);
        }
        if (isKind(res.data, as)) show(res.data);
        setError(null);
        setReady(socket.connected);
      });
    };
    const down = () => {
      setConnected(false);
      setReady(false);
    };
    socket.on('connect', () => {
      setConnected(true);
      watch();
    });
    socket.on('disconnect', down);
    socket.on('connect_error', down);
    socket.on('storage:status', ({ ok }) => setStorageOk(ok));
    // The hub puts this socket in one kind's room only; the tag keeps the type honest.
    const onView = (v: WatchedView) => {
      if (isKind(v, as)) show(v);
    };
    socket.on('view:participant', onView);
    socket.on('view:floor', onView);
    socket.on('view:big-screen', onView);

    const onOnline = () => {
      setOnline(true);
      // Back on the network: try now rather than at the next back-off step (up to 4 s away);
      // disconnect() cancels the scheduled attempt, connect() starts a fresh one.
      if (!socket.connected) socket.disconnect().connect();
    };
    const onOffline = () => setOnline(false);
    setOnline(navigator.onLine);
    window.addEventListener('online', onOnline);
    window.addEventListener('offline', onOffline);
    return () => {
      window.removeEventListener('online', onOnline);
      window.removeEventListener('offline', onOffline);
      clearTimeout(retry);
      socket.close();
      socketRef.current = null;
    };
  }, [sessionId, as]);

  const ask: Ask = useCallback(async (send) => {
    const s = socketRef.current;
    if (!s || !s.connected) return { ok: false, code: 'server-error', message: 'Not connected. Trying again…' };
    try {
      return await send(s.timeout(ACK_WAIT_MS));
    } catch {
      return { ok: false, code: 'server-error', message: 'No answer from the server. Try again.' };
    }
  }, []);

  return { view, connected, ready, online, storageOk, error, ask, socket: socketRef };
}

/**
 * Milliseconds left until a server deadline, kept in step with the server's clock, and never more
 * than the round has (`maxMs`). The offset is measured against the loader's clock, which ran
 * before the page travelled and hydrated: on a slow phone it is seconds short, and the first
 * second of a 30 s round read "31 s" or more.
 */
export function useCountdown(deadline: number | null, serverOffsetMs: number, maxMs = Infinity) {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    if (deadline === null) return;
    setNow(Date.now());
    const t = setInterval(() => setNow(Date.now()), 250);
    return () => clearInterval(t);
  }, [deadline]);
  if (deadline === null) return null;
  return Math.min(maxMs, Math.max(0, deadline - (now + serverOffsetMs)));
}
