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
