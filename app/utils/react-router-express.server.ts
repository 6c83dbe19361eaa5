// React Router behind Express (what @react-router/express does), with one difference: the body of
// a request is the one capBodies already read and capped (request-limits.server.ts), since the
// request's own stream is consumed by then. The fetch Request is built here from the Express
// request, the route's Response written back to it.
import { writeReadableStreamToWritable } from '@react-router/node';
import type { NextFunction, Request as ExpressRequest, Response as ExpressResponse } from 'express';
import { type AppLoadContext, createRequestHandler, type ServerBuild } from 'react-router';
import { readBody } from './request-limits.server';

export function reactRouterHandler({
  build,
  mode,
  getLoadContext,
}: {
  build: ServerBuild | (() => Promise<ServerBuild>);
  mode: 'production' | 'development';
  getLoadContext: (req: ExpressRequest, res: ExpressResponse) => AppLoadContext;
}) {
  const handle = createRequestHandler(build, mode);
  return async (req: ExpressRequest, res: ExpressResponse, next: NextFunction) => {
    try {
      const response = await handle(fetchRequest(req, res), getLoadContext(req, res));
      await send(res, response);
    } catch (error) {
      next(error);
    }
  };
}

/** The fetch Request React Router reads: the URL as the client addressed it, headers, the read body. */
function fetchRequest(req: ExpressRequest, res: ExpressResponse): Request {
  // The port of X-Forwarded-Host (behind a trusted proxy) or of Host; req.hostname drops it.
  const [, forwardedPort] = req.app.enabled('trust proxy') ? (req.get('X-Forwarded-Host')?.split(':') ?? []) : [];
  const [, hostPort] = req.get('host')?.split(':') ?? [];
  const port = [forwardedPort, hostPort].map((p) => Number.parseInt(p ?? '', 10)).find((p) => Number.isSafeInteger(p));
  // An HTTP/1.0 request (a load balancer's health check) may carry no Host at all.
  const hostname = (req.hostname ?? '').split(/[\\/?#@]/)[0] || 'localhost';
  const url = new URL(`${req.protocol}://${hostname}${port ? `:${port}` : ''}${req.originalUrl}`);

  const headers = new Headers();
  for (const [key, value] of Object.entries(req.headers)) {
    if (Array.isArray(value)) for (const v of value) headers.append(key, v);
    else if (value) headers.set(key, value);
  }
  // A client that goes away before the answer is written aborts the loaders' signal.
  let controller: AbortController | null = new AbortController();
  res.on('finish', () => (controller = null));
  res.on('close', () => controller?.abort());

  if (req.method === 'GET' || req.method === 'HEAD') return new Request(url, { method: req.method, headers, signal: controller.signal });
  const body = readBody(req);
  if (!body) throw new Error(`${req.method} ${req.originalUrl}: no body was read (capBodies must run before React Router)`);
  return new Request(url, { method: req.method, headers, signal: controller.signal, body: new Uint8Array(body) });
}

async function send(res: ExpressResponse, response: Response) {
  if (res.destroyed || res.writableEnded) {
    await response.body?.cancel();
    return;
  }
  res.statusMessage = response.statusText;
  res.status(response.status);
  for (const [key, value] of response.headers.entries()) res.append(key, value);
  if (response.headers.get('Content-Type')?.match(/text\/event-stream/i)) res.flushHeaders();
  if (!response.body) {
    res.end();
    return;
  }
  try {
    await writeReadableStreamToWritable(response.body, res);
  } catch (error) {
    if (res.destroyed || res.writableEnded) return;
    throw error;
  }
}
