// `npm start`: everything a fresh clone needs, then Parley on http://127.0.0.1:$PORT, kept running:
// if the Parley process dies it is said and Parley restarts (live sessions resume from the
// database), at most 3 times a minute; past that everything stops and the exit code is 1.
// Ctrl-C stops what this script started. PARLEY_INSTANCES=n starts n processes behind HAProxy
// instead (scripts/start-cluster.mjs).
import path from 'node:path';
import { prepareLocalStack, superviseParley } from './lib/local-stack.mjs';
import { fail, root, say, stopOnSignals, waitForHttp } from './lib/services.mjs';

// PARLEY_INSTANCES=n (n > 1): the cluster of `npm run start:cluster` instead of one process.
const instances = Number(process.env.PARLEY_INSTANCES ?? 1);
if (instances > 1) await import('./start-cluster.mjs');
else await single();

async function single() {
  // `npm run dev` passes --dev: Vite middleware with hot reload instead of the production build.
  const dev = process.argv.includes('--dev');
  const port = Number(process.env.PORT ?? 3000);
  const dbPort = Number(process.env.PARLEY_DB_PORT ?? 3307);
  const smtpPort = Number(process.env.PARLEY_SMTP_PORT ?? 1025);
  const mailWebPort = Number(process.env.PARLEY_MAIL_WEB_PORT ?? 1080);
  // Another data folder (a second instance, the supervision test) through PARLEY_DATA_DIR.
  const dataDir = process.env.PARLEY_DATA_DIR ? path.resolve(process.env.PARLEY_DATA_DIR) : path.join(root, '.data/dev');

  stopOnSignals();
  const t0 = Date.now();
  const env = await prepareLocalStack({
    dataDir,
    dbPort,
    smtpPort,
    mailWebPort,
    dev,
    extra: { PORT: String(port), APP_URL: process.env.APP_URL ?? `http://127.0.0.1:${port}` },
  });
  const { supervisor: parley, healthz } = superviseParley({
    name: 'Parley',
    env,
    port,
    back: (pid) => `Parley is back (pid ${pid}) on http://127.0.0.1:${port}; live sessions resumed from the database`,
  });
  if (!(await waitForHttp(healthz, 60_000, parley.child))) {
    fail(`Parley did not answer on port ${port}`, `Is the port taken? Try PORT=3001 npm start`);
  }
  say(`ready in ${((Date.now() - t0) / 1000).toFixed(1)} s (Parley pid ${parley.child.pid})`);
  console.log(`
    Parley          http://127.0.0.1:${port}
    Mail catcher    http://127.0.0.1:${mailWebPort}   (every e-mail, including sign-in codes)
    MariaDB         127.0.0.1:${dbPort}, data in ${path.relative(root, dataDir) || '.'}/mariadb

    Demo accounts (invented; sign in with the e-mail, read the code in the mail catcher):
      instructor    r.okafor@halvorsen.example
      assistant     j.lindqvist@halvorsen.example
      researcher    m.achterberg@halvorsen.example
      participant   student01@halvorsen.example … student40@halvorsen.example
      site admin    admin@halvorsen.example

    Ctrl-C stops Parley, maildev and MariaDB.
  `);
}
