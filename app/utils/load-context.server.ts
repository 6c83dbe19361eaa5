// What server.ts hands every loader and action as React Router's load context (`context`), made
// from the Express request it serves. Plain values under string keys: server.ts and the built app
// are separate module graphs, so the context API's object keys (createContext) would not match.
import type { Request as ExpressRequest, Response as ExpressResponse } from 'express';
import type { AppLoadContext } from 'react-router';

declare module 'react-router' {
  interface AppLoadContext {
    /**
     * The client's address for rate limits and sign-in records: the socket's peer, or the
     * X-Forwarded-For client behind a trusted proxy (TRUST_PROXY). Nothing a client sends sets it.
     */
    readonly clientIp: string;
    /** This response's Content-Security-Policy nonce (app/utils/csp-nonce.server.ts), for entry.server.tsx. */
    readonly cspNonce: string | undefined;
  }
}

export function loadContext(req: ExpressRequest, res: ExpressResponse): AppLoadContext {
  // req.ip is the socket's address unless Express's 'trust proxy' is set (server.ts sets it from TRUST_PROXY).
  const cspNonce: unknown = res.locals.cspNonce;
  return {
    clientIp: req.ip ?? req.socket.remoteAddress ?? 'unknown',
    cspNonce: typeof cspNonce === 'string' ? cspNonce : undefined,
  };
}
