/** Adds a Set-Cookie to a thrown redirect (remix-auth throws its redirects). */
export function withCookie(thrown: unknown, cookie: string): unknown {
  if (!(thrown instanceof Response)) return thrown;
  const headers = new Headers(thrown.headers);
  headers.append('Set-Cookie', cookie);
  return new Response(thrown.body, { status: thrown.status, statusText: thrown.statusText, headers });
}

/** A POST for the sign-in strategy with exactly the given fields (it reads the body itself). */
export function strategyRequest(request: Request, fields: Record<string, string>) {
  const headers = new Headers(request.headers);
  headers.delete('content-length');
  headers.set('content-type', 'application/x-www-form-urlencoded');
  return new Request(request.url, { method: 'POST', headers, body: new URLSearchParams(fields) });
}

/**
 * The HTTP statuses a route answers a caller with when it will not go on: a malformed request, a
 * refusal, nothing there, a conflict with the current state. Everything else unexpected is a bug
 * and becomes a 500 by itself.
 */
export type RefusalStatus = 400 | 403 | 404 | 409;

/**
 * Throws a plain-text response: the route's error boundary shows `message` in the page's shell,
 * and a resource route's caller reads it as the body. Routes (and the guards they call) throw it;
 * models never do (DEVELOPERS.md, Conventions, "Errors").
 */
export function respond(status: RefusalStatus, message: string): never {
  throw new Response(message, { status, headers: { 'content-type': 'text/plain; charset=utf-8' } });
}

/**
 * Responds with `status` and `message` unless `condition` holds; narrows it when it does:
 * `respondUnless(session, 404, 'No such session in this course.')`.
 */
export function respondUnless(condition: unknown, status: RefusalStatus, message: string): asserts condition {
  if (!condition) respond(status, message);
}

/** A positive whole-number id from the URL; anything else is "No such <what>." (a 404). */
export function parseId(raw: string | undefined, what: string): number {
  const id = Number(raw);
  respondUnless(raw && Number.isSafeInteger(id) && id > 0, 404, `No such ${what}.`);
  return id;
}

/** `?sessions=3,4` (links) or `?sessions=3&sessions=4` (a list's checkboxes) → [3, 4]; malformed or empty → 400. */
export function sessionIdsParam(url: URL, max = 20): number[] {
  const parts = url.searchParams
    .getAll('sessions')
    .join(',')
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);
  const ids = parts.map(Number);
  respondUnless(
    parts.length > 0 && ids.every((n) => Number.isSafeInteger(n) && n > 0),
    400,
    'Name the sessions as ?sessions=1,2 (session numbers of this course).',
  );
  respondUnless(ids.length <= max, 400, `At most ${max} sessions at once.`);
  return [...new Set(ids)];
}
