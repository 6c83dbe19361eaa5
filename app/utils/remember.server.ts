// One value per process (a pool, a mail transport, the session runner, the jobs worker), made on
// first use and kept on globalThis.
//
// Why globalThis and not a module-level `let`: server.ts is loaded by tsx, while route modules come
// from the build bundle (or, in development, from Vite's module graph, reloaded on every edit), and
// each holds its own copy of every module it imports. A module-level value would exist once per
// copy: two pools, two jobs workers, a runner server.ts set that routes never see. globalThis is
// the one object all copies share. (The idea is Epic Stack's `singleton`; these are our own lines.)
declare global {
  // the one place a process's singletons live, by name
  var __parleyRemembered: Map<string, unknown> | undefined;
}

function store(): Map<string, unknown> {
  globalThis.__parleyRemembered ??= new Map();
  return globalThis.__parleyRemembered;
}

/** The value remembered under `name`, made by `create` the first time it is asked for. */
export function remember<T>(name: string, create: () => T): T {
  const values = store();
  if (!values.has(name)) values.set(name, create());
  // Each name is made and read by one module with one type: the map cannot know it, the caller does.
  return values.get(name) as T;
}

/** The value remembered under `name`, if one was made (nothing is made here). */
export function remembered<T>(name: string): T | undefined {
  return store().get(name) as T | undefined;
}

/** Forgets the value (the next `remember` makes a new one); for closing a pool, stopping a worker. */
export function forget(name: string): void {
  store().delete(name);
}

/** A slot another module fills (server.ts leaves the runner here): `current` is undefined until then. */
export function rememberSlot<T>(name: string): { current: T | undefined } {
  return remember<{ current: T | undefined }>(name, () => ({ current: undefined }));
}
