import { useCallback, useEffect, useRef, useState } from 'react';
import { io, type Socket } from 'socket.io-client';
import type { Ack, ClientToServerEvents, ServerToClientEvents } from '#realtime/protocol';
import type { BigScreenView, FloorView, ParticipantView } from '#realtime/engine/types';

type ViewOf = { participant: ParticipantView; floor: FloorView; 'big-screen': BigScreenView };
export type LiveSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

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
export function useSessionView<K extends keyof ViewOf>(sessionId: number, as: K, initial: ViewOf[K] | null) {
  const [view, setView] = useState<ViewOf[K] | null>(initial);
  const [connected, setConnected] = useState(false);
  const [ready, setReady] = useState(false);
  const [online, setOnline] = useState(true);
  const [storageOk, setStorageOk] = useState(true);
  const [error, setError] = useState<string | null>(null);
  const socketRef = useRef<LiveSocket | null>(null);

  useEffect(() => {
    const socket: LiveSocket = io({ transports: ['websocket'], reconnectionDelayMax: 4000 });
    socketRef.current = socket;
    const watch = () => {
      socket.emit('session:watch', { sessionId, as }, (res) => {
        if (res.ok) {
          setView(res.data as ViewOf[K]);
          setError(null);
          setReady(socket.connected);
        } else setError(res.message);
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
    const eventName = as === 'participant' ? 'view:participant' : as === 'floor' ? 'view:floor' : 'view:big-screen';
    const onView = (v: ViewOf[K]) => setView(v);
    socket.on(eventName as 'view:participant', onView as (v: ParticipantView) => void);

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
      socket.close();
      socketRef.current = null;
    };
  }, [sessionId, as]);

  const emit = useCallback(
    <E extends keyof ClientToServerEvents>(event: E, payload: Parameters<ClientToServerEvents[E]>[0]) =>
      new Promise<Ack<unknown>>((resolve) => {
        const s = socketRef.current;
        if (!s || !s.connected) {
          resolve({ ok: false, code: 'server-error', message: 'Not connected. Trying again…' });
          return;
        }
        (s.timeout(8000).emit as (e: string, p: unknown, cb: (err: Error | null, res: Ack<unknown>) => void) => void)(
          event,
          payload,
          (err, res) => resolve(err ? { ok: false, code: 'server-error', message: 'No answer from the server. Try again.' } : res),
        );
      }),
    [],
  );

  return { view, connected, ready, online, storageOk, error, emit, socket: socketRef };
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
