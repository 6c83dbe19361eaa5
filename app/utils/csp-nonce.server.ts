// The Content-Security-Policy nonce of a request: made in server.ts, written into the policy by
// app/utils/security-headers.server.ts and onto React Router's scripts by app/entry.server.tsx (the
// load context carries it there: app/utils/load-context.server.ts).
import { randomBytes } from 'node:crypto';
import type { NextFunction, Request as ExpressRequest, Response as ExpressResponse } from 'express';

/** Makes a fresh nonce for this request, for the policy and for the app (both read res.locals). */
export function cspNonce(_req: ExpressRequest, res: ExpressResponse, next: NextFunction) {
  res.locals.cspNonce = randomBytes(16).toString('base64');
  next();
}
