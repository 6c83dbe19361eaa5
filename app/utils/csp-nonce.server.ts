// The Content-Security-Policy nonce of a request: made in server.ts, written into the policy by
// app/utils/security-headers.server.ts and onto React Router's scripts by app/entry.server.tsx.
import { randomBytes } from 'node:crypto';
import type { NextFunction, Request as ExpressRequest, Response as ExpressResponse } from 'express';

/**
 * The request header that carries the nonce to entry.server.tsx. A request header rather than the
 * load context because server.ts and the built app are separate module graphs (a context key made
 * in one is not the key in the other). Any value a client sends is replaced.
 */
export const NONCE_HEADER = 'x-parley-csp-nonce';

/** Makes a fresh nonce for this request, for the policy (res.locals) and for the app (the header). */
export function cspNonce(req: ExpressRequest, res: ExpressResponse, next: NextFunction) {
  const nonce = randomBytes(16).toString('base64');
  res.locals.cspNonce = nonce;
  req.headers[NONCE_HEADER] = nonce;
  next();
}
