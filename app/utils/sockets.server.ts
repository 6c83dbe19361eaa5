// What pages may ask of the socket hub: close the sockets of a sign-in or of a user at once (sign-out,
// a member removed or given another role). server.ts's hub registers itself here; route modules come
// from the build bundle, which holds its own copies of modules, so they reach it through globalThis.
export interface SocketControl {
  /** closes the sockets that came in with this sign-in (auth_sessions id) */
  dropAuthSession(authKey: string): void;
  /** closes every socket of this user; they reconnect and are authorised afresh */
  dropUser(userId: number): void;
}

declare global {
  // one per process: kept across Vite's reloads of this module, shared by server.ts and the built bundle
  var __parleySockets: SocketControl | undefined;
}
const g = globalThis;

export function setSocketControl(control: SocketControl | undefined) {
  g.__parleySockets = control;
}

/** Without a hub (scripts, unit tests) there are no sockets to close. */
const none: SocketControl = { dropAuthSession: () => undefined, dropUser: () => undefined };

export function sockets(): SocketControl {
  return g.__parleySockets ?? none;
}
