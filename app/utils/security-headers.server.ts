// Response headers that keep pages from being framed, sniffed, leaked through the Referer or kept
// in caches, and a nonce-based Content-Security-Policy. Issue 9, finding 10. helmet writes the
// headers; the nonce comes from app/utils/csp-nonce.server.ts (res.locals.cspNonce).
import type { IncomingMessage, ServerResponse } from 'node:http';
import type { NextFunction, Request as ExpressRequest, Response as ExpressResponse } from 'express';
import helmet from 'helmet';
import onHeaders from 'on-headers';

export function securityHeaders(appUrl: string, development: boolean) {
  const app = new URL(appUrl);
  const https = app.protocol === 'https:';
  // socket.io's WebSocket to our own host (some browsers do not count ws: as 'self').
  const socketOrigin = `${https ? 'wss' : 'ws'}://${app.host}`;
  const nonce = (_req: IncomingMessage, res: ServerResponse) => `'nonce-${(res as ExpressResponse).locals.cspNonce as string}'`;
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        baseUri: ["'self'"],
        objectSrc: ["'none'"],
        frameAncestors: ["'none'"],
        formAction: ["'self'"],
        // React Router's inline scripts carry the nonce; the modules they load are ours. Vite's
        // development server injects inline scripts without one and evaluates modules, so
        // development alone allows inline scripts and eval.
        scriptSrc: development ? ["'self'", "'unsafe-inline'", "'unsafe-eval'"] : ["'self'", nonce],
        scriptSrcAttr: ["'none'"],
        // recharts and React set style attributes (positions, colours of the charts), which only
        // 'unsafe-inline' allows; styles cannot run code, and scripts stay nonce-only.
        styleSrc: ["'self'", "'unsafe-inline'"],
        // Vite inlines small images as data: URLs (and a QR code may be one).
        imgSrc: ["'self'", 'data:'],
        fontSrc: ["'self'"],
        connectSrc: development ? ["'self'", 'ws:', 'wss:'] : ["'self'", socketOrigin],
        ...(https ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    xFrameOptions: { action: 'deny' },
    // Our own pages keep the full Referer (the Origin check falls back to it); other sites get none.
    referrerPolicy: { policy: 'same-origin' },
    // HSTS only where the public address is https (a browser ignores it over http anyway).
    strictTransportSecurity: https ? { maxAge: 180 * 24 * 3600, includeSubDomains: false } : false,
  });
}

/**
 * Every response React Router makes (pages, their data, downloads) may show personal data, so
 * none is stored by browsers or proxies, whatever the route set. Static files are served before
 * this and keep their own caching (/assets are immutable).
 */
export function noStore(_req: ExpressRequest, res: ExpressResponse, next: NextFunction) {
  onHeaders(res, () => {
    res.setHeader('Cache-Control', 'no-store');
  });
  next();
}
