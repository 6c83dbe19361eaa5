// Request bodies are capped in server.ts before React Router (or any action) sees them, counting
// bytes as they stream: a chunked body carries no Content-Length for an action to check, and
// `request.formData()` reads whatever arrives. Issue 9, finding 3.
import type { NextFunction, Request as ExpressRequest, Response as ExpressResponse } from 'express';
import getRawBody from 'raw-body';
import { ROSTER_LIMITS } from '#app/lib/roster-csv';
import { DATASET_LIMITS } from '#app/models/datasets.server';

const KB = 1024;
const MB = 1024 * KB;

/** Every form and JSON body of the pages, sign-in included (a few hundred bytes in practice). */
export const PAGE_BODY_LIMIT = 64 * KB;

/**
 * Routes whose bodies may be larger, by pathname (`.data` is React Router's single-fetch form of
 * the same route). A path that only matches after decoding falls back to the page limit, which is
 * the safe direction.
 */
const LARGER: { path: RegExp; limit: number; signedInOnly: boolean }[] = [
  // Roster: the file (multipart) at preview, then the same CSV as a form field at import, which
  // percent-encoding can make up to three times larger. The route refuses above twice the file
  // limit with its own message; this cap sits above that so the message can be shown.
  { path: /^\/courses\/\d+\/roster(\.data)?\/?$/, limit: ROSTER_LIMITS.maxBytes * 4, signedInOnly: true },
  // Uploaded panels: the file limit plus the multipart envelope and the column-mapping fields.
  { path: /^\/courses\/\d+\/datasets(\.data)?\/?$/, limit: DATASET_LIMITS.maxBytes + 1 * MB, signedInOnly: true },
  // Design instructions may be 20,000 characters; percent-encoded UTF-8 takes up to 12 bytes each.
  { path: /^\/courses\/\d+\/designs\/(new|\d+)(\.data)?\/?$/, limit: 256 * KB, signedInOnly: false },
];

/**
 * The most bytes a request to `pathname` may carry. Upload allowances go only to signed-in
 * callers, so an anonymous client cannot make the server hold megabytes per connection.
 */
export function bodyLimitFor(pathname: string, signedIn: boolean): number {
  const route = LARGER.find((r) => r.path.test(pathname));
  if (!route || (route.signedInOnly && !signedIn)) return PAGE_BODY_LIMIT;
  return route.limit;
}

/** Whether a route has a larger allowance for signed-in callers (then the cookie is worth reading). */
export function needsSignInForLimit(pathname: string) {
  return LARGER.some((r) => r.signedInOnly && r.path.test(pathname));
}

/** The body read by capBodies, kept on the request for the React Router handler. */
const BODY = Symbol('parley.body');
type WithBody = ExpressRequest & { [BODY]?: Buffer };

/** How long an oversized body is still read (and dropped) after the refusal, at most. */
const LINGER_MS = 2000;

/**
 * Answers while the client may still be sending. Closing the connection at once would make the
 * client's next write fail (EPIPE, a reset) before it reads the answer, so the rest of the body is
 * read and dropped (no memory held) for a short while, then the connection is closed.
 */
function refuse(req: ExpressRequest, res: ExpressResponse, status: number, message: string) {
  res.status(status).type('text/plain').send(message);
  const close = setTimeout(() => req.socket.destroy(), LINGER_MS);
  close.unref();
  req.once('end', () => clearTimeout(close));
  req.resume();
}

/**
 * Express middleware: reads the body of every request that may change something, up to the
 * route's limit (raw-body counts the bytes as they arrive and stops at the limit), and answers
 * 413 at once when the Content-Length or the bytes received exceed it. Nothing else runs then.
 */
export function capBodies(isSignedIn: (cookieHeader: string | undefined) => Promise<boolean>) {
  return async (req: ExpressRequest, res: ExpressResponse, next: NextFunction) => {
    // React Router reads no body of GET or HEAD; Node discards one if sent.
    if (req.method === 'GET' || req.method === 'HEAD') return next();
    try {
      const signedIn = needsSignInForLimit(req.path) ? await isSignedIn(req.headers.cookie) : false;
      const limit = bodyLimitFor(req.path, signedIn);
      try {
        (req as WithBody)[BODY] = await getRawBody(req, { length: req.headers['content-length'], limit });
      } catch (error) {
        const status = (error as getRawBody.RawBodyError).status;
        if (status === 413) return refuse(req, res, 413, `The request is too large (at most ${Math.floor(limit / KB)} KB here).`);
        // A body shorter than its Content-Length, or a client that went away.
        return refuse(req, res, 400, 'The request body was incomplete.');
      }
      next();
    } catch (error) {
      next(error);
    }
  };
}

/** The body capBodies read from a request (the stream itself is consumed by then). */
export function readBody(req: ExpressRequest): Buffer | undefined {
  return (req as WithBody)[BODY];
}
