// Requests that change something must come from Parley's own pages. SameSite=Lax cookies stop
// other *sites*, but not another origin on the same site (another port or subdomain of the same
// host), so every state-changing request and every socket handshake is checked against APP_URL's
// origin. Issue 9, finding 6.
import type { IncomingMessage } from 'node:http';
import type { NextFunction, Request as ExpressRequest, Response as ExpressResponse } from 'express';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The origin of a URL-like header value, or null when it is absent, "null" or unparsable. */
function originOf(value: string | undefined): string | null {
  if (!value || value === 'null') return null;
  try {
    const origin = new URL(value).origin;
    return origin === 'null' ? null : origin;
  } catch {
    return null;
  }
}

export type OriginVerdict = 'same' | 'foreign' | 'absent';

/**
 * Where a request says it comes from: the Origin header, else the Referer (browsers leave Origin
 * out of a few same-origin requests; the Referrer-Policy keeps the Referer for our own origin).
 */
export function requestOrigin(appOrigin: string, headers: { origin?: string; referer?: string }): OriginVerdict {
  const claimed = headers.origin !== undefined ? headers.origin : headers.referer;
  if (claimed === undefined) return 'absent';
  return originOf(claimed) === appOrigin ? 'same' : 'foreign';
}

/**
 * Express middleware: refuses (403, JSON) every request with a body-changing method whose Origin
 * (or Referer) is not APP_URL's, and one that names neither. /api/v1 is exempt: it is read-only,
 * answers 405 to anything else, and authenticates by bearer token, never by cookie.
 */
export function requireSameOrigin(appUrl: string) {
  const appOrigin = new URL(appUrl).origin;
  return (req: ExpressRequest, res: ExpressResponse, next: NextFunction) => {
    if (SAFE_METHODS.has(req.method) || req.path.startsWith('/api/v1/')) return next();
    if (requestOrigin(appOrigin, req.headers) === 'same') return next();
    res.status(403).json({
      error: {
        code: 'cross_origin',
        message: `This request did not come from Parley's own pages. Open Parley at ${appOrigin} and try again.`,
      },
    });
  };
}

/**
 * socket.io `allowRequest`: refuses a handshake whose Origin is not APP_URL's. A handshake without
 * Origin is allowed: browsers always send one on a WebSocket and on a cross-origin request, so its
 * absence means a client outside the browser (scripts, tests) or a same-origin long-polling GET;
 * such a client still needs the signed sign-in cookie.
 */
export function allowSocketOrigin(appUrl: string) {
  const appOrigin = new URL(appUrl).origin;
  return (req: IncomingMessage, callback: (err: string | null | undefined, success: boolean) => void) => {
    const origin = req.headers.origin;
    if (origin === undefined || originOf(origin) === appOrigin) callback(null, true);
    else callback('forbidden-origin', false);
  };
}
