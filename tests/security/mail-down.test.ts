// The mail server down or silent while students sign in: a clear message within seconds, nothing
// internal shown, and the failed try not counted against the address. A second app server on its
// own port talks to an SMTP "server" that accepts connections and never answers.
import net from 'node:net';
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { signInCodes } from '#drizzle/schema';
import { closeTestDb, testDb } from '#tests/helpers/db';
import { Client, uniqueEmail } from '#tests/helpers/http';
import { SecondServer } from '#tests/helpers/second-server';

let server: SecondServer | null = null;
const held: net.Socket[] = [];
let silent = true;
// Silent first (the 30-second hang), then refusing at once (a mail server that is down).
const smtp = net.createServer((socket) => {
  if (silent) held.push(socket);
  else socket.destroy();
});

afterAll(async () => {
  await server?.kill();
  for (const s of held) s.destroy();
  await new Promise((resolve) => smtp.close(resolve));
  await closeTestDb();
});

async function start() {
  await new Promise<void>((resolve) => smtp.listen(0, '127.0.0.1', resolve));
  const smtpPort = (smtp.address() as net.AddressInfo).port;
  server = new SecondServer(Number(new URL(process.env.PARLEY_TEST_URL!).port) + 41, { SMTP_URL: `smtp://127.0.0.1:${smtpPort}` });
  await server.start();
  return server.base;
}

describe('sign-in while the mail server is down', () => {
  it('says so within seconds, shows nothing internal, and does not count the try', { timeout: 90_000 }, async () => {
    const base = await start();
    const email = uniqueEmail('nomail');
    const c = new Client(base);
    const t0 = Date.now();
    const res = await c.post('/sign-in', { email });
    const seconds = (Date.now() - t0) / 1000;
    const page = (await res.text()).replaceAll('<!-- -->', '');
    expect(res.status).toBe(503);
    expect(seconds).toBeLessThan(15);
    expect(page).toContain('We could not send the e-mail just now. Please try again in a minute.');
    expect(page).not.toMatch(/127\.0\.0\.1:\d+|ETIMEDOUT|ECONNREFUSED|Greeting|SMTP/i);
    // What was typed stays in the field.
    expect(page).toContain(`value="${email}"`);

    silent = false;
    // More failed tries than the per-address limit: none is counted, so none is refused as "too many".
    for (let i = 0; i < 6; i++) expect((await c.post('/sign-in', { email })).status).toBe(503);
    expect(await testDb().select().from(signInCodes).where(eq(signInCodes.email, email))).toHaveLength(0);
  });
});
