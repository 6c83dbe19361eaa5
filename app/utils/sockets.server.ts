// What pages may ask of the socket hub: close the sockets of a sign-in or of a user at once (sign-out,
// a member removed or given another role). server.ts's hub registers itself here; route modules come
// from the build bundle, which holds its own copies of modules, so they reach it through remember().
import { rememberSlot } from './remember.server';

export interface SocketControl {
  /** closes the sockets that came in with this sign-in (auth_sessions id) */
  dropAuthSession(authKey: string): void;
  /** closes every socket of this user; they reconnect and are authorised afresh */
  dropUser(userId: number): void;
}

const hub = () => rememberSlot<SocketControl>('socket-control');

export function setSocketControl(control: SocketControl | undefined) {
  hub().current = control;
}

/** Without a hub (scripts, unit tests) there are no sockets to close. */
const none: SocketControl = { dropAuthSession: () => undefined, dropUser: () => undefined };

export function sockets(): SocketControl {
  return hub().current ?? none;
}
