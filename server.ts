// One process: HTTP server, React Router handler (Vite middleware in development, the build in
// production) and the socket.io hub on the same port. Stops cleanly on SIGINT/SIGTERM.
import { createServer } from 'node:http';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import compression from 'compression';
import express from 'express';
import type { ServerBuild } from 'react-router';
import { closeDb } from '#app/utils/db.server';
import { env } from '#app/utils/env.server';
import { startJobs } from '#app/jobs/all.server';
import { stopJobWorker } from '#app/jobs/queue.server';
import { signedInFromCookie } from '#app/utils/auth.server';
import { cspNonce } from '#app/utils/csp-nonce.server';
import { requireSameOrigin } from '#app/utils/origin.server';
import { loadContext } from '#app/utils/load-context.server';
import { reactRouterHandler } from '#app/utils/react-router-express.server';
import { capBodies } from '#app/utils/request-limits.server';
import { noStore, securityHeaders } from '#app/utils/security-headers.server';
import { attachHub } from '#realtime/hub';

const config = env();
const production = config.NODE_ENV === 'production';

const app = express();
app.disable('x-powered-by');
app.set('trust proxy', config.TRUST_PROXY);
const httpServer = createServer(app);

// Security headers on every response: a per-request CSP nonce, no framing, no sniffing.
app.use(cspNonce, securityHeaders(config.APP_URL, config.NODE_ENV === 'development'));
// Anything that may change state must come from our own pages (same-site CSRF).
app.use(requireSameOrigin(config.APP_URL));
// Bodies are read here, up to each route's limit, before anything parses them (413 above it).
app.use(capBodies(async (cookie) => (await signedInFromCookie(cookie)) !== null));
app.use(compression());

if (production) {
  const buildDir = path.resolve('build');
  app.use('/assets', express.static(path.join(buildDir, 'client/assets'), { immutable: true, maxAge: '1y' }));
  app.use(express.static(path.join(buildDir, 'client'), { maxAge: '1h' }));
  const build = (await import(pathToFileURL(path.join(buildDir, 'server/index.js')).href)) as ServerBuild;
  // Loaders and actions get the client's address and the CSP nonce in their load context.
  app.use(noStore, reactRouterHandler({ build, mode: 'production', getLoadContext: loadContext }));
} else {
  const vite = await import('vite').then((v) => v.createServer({ server: { middlewareMode: true, ws: { server: httpServer } } }));
  app.use(vite.middlewares);
  app.use(noStore, async (req, res, next) => {
    try {
      const build = (await vite.ssrLoadModule('virtual:react-router/server-build')) as ServerBuild;
      await reactRouterHandler({ build, mode: 'development', getLoadContext: loadContext })(req, res, next);
    } catch (error) {
      if (error instanceof Error) vite.ssrFixStacktrace(error);
      next(error);
    }
  });
}

// REDIS_URL: cluster mode (socket.io's Redis adapter, one owner per live session; realtime/cluster.ts).
const { io, runner, cluster } = await attachHub(httpServer, { redisUrl: config.REDIS_URL });
// A restarted server carries on every open, running and paused session from the database (in
// cluster mode: those it owns, through the same takeover as a membership change; the others'
// owners hold theirs).
(cluster ? cluster.rebalance() : runner.recoverAll())
  .then((n) => n && console.log(`[parley] resumed ${n} live session(s) from the database`))
  .catch((error) => console.error('[parley] could not resume live sessions', error));
// Background jobs (estimations, results e-mails, the hourly pruning of sign-in records), queued in
// MariaDB: this process takes its share, including what a stopped process left (app/jobs).
if (config.PARLEY_JOBS === 'on') startJobs();

httpServer.listen(config.PORT, config.HOST, () => {
  console.log(`[parley] serving http://${config.HOST}:${config.PORT} (${production ? 'production' : 'development'})`);
});

let closing = false;
async function shutdown(signal: string) {
  if (closing) return;
  closing = true;
  console.log(`[parley] ${signal}: closing`);
  // Closing connections rejects what was still queued on them (a Redis publish while Redis is
  // away, say): said, not a crash with exit code 1 on the way out.
  process.on('unhandledRejection', (error) => console.warn('[parley] while closing:', error instanceof Error ? error.message : error));
  const force = setTimeout(() => process.exit(1), 8000);
  force.unref();
  runner.close();
  // Leave the members first: the others take this process's sessions over at their next poll.
  await cluster?.leave().catch(() => undefined);
  await stopJobWorker().catch(() => undefined);
  await new Promise<void>((resolve) => io.close(() => resolve()));
  await cluster?.close().catch(() => undefined);
  httpServer.closeAllConnections();
  await new Promise<void>((resolve) => httpServer.close(() => resolve()));
  await closeDb();
  process.exit(0);
}
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));
