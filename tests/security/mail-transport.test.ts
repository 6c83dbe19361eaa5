// Issue 9 #11: with the mail server unreachable a send hung for about 30 s and the error shown
// carried the internal SMTP address. sendMail now gives up within a few seconds and throws
// MailNotSentError, whose message is fit to show; the original error is its cause.
import net from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createMailTransport, MailNotSentError, sendMail } from '#app/utils/mail.server';

const mail = { to: 'nobody@tests.parley.test', subject: 'Test', text: 'Test', html: '<p>Test</p>' };

/** An SMTP server that accepts connections and never says hello. */
let silent: net.Server;
const held: net.Socket[] = [];
beforeAll(async () => {
  silent = net.createServer((s) => held.push(s));
  await new Promise<void>((r) => silent.listen(0, '127.0.0.1', r));
});
afterAll(async () => {
  for (const s of held) s.destroy();
  await new Promise((r) => silent.close(r));
});

async function freePort() {
  const s = net.createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
  const port = (s.address() as net.AddressInfo).port;
  await new Promise((r) => s.close(r));
  return port;
}

async function failure(url: string) {
  const t0 = Date.now();
  const error = await sendMail(mail, createMailTransport(url)).then(
    () => null,
    (e: unknown) => e,
  );
  return { error, ms: Date.now() - t0 };
}

describe('sendMail when the mail server is down', () => {
  it('a server that never answers: MailNotSentError within about 6 s, no internals in the message', async () => {
    const port = (silent.address() as net.AddressInfo).port;
    const { error, ms } = await failure(`smtp://127.0.0.1:${port}`);
    expect(error).toBeInstanceOf(MailNotSentError);
    expect(ms).toBeLessThan(6_500);
    const e = error as MailNotSentError;
    expect(e.message).toBe('We could not send the e-mail. Please try again in a moment.');
    expect(e.message).not.toContain(String(port));
    expect(e.cause).toBeInstanceOf(Error);
  }, 15_000);

  it('nothing listening: MailNotSentError at once', async () => {
    const { error, ms } = await failure(`smtp://127.0.0.1:${await freePort()}`);
    expect(error).toBeInstanceOf(MailNotSentError);
    expect(ms).toBeLessThan(6_500);
    expect((error as Error).message).not.toMatch(/127\.0\.0\.1|ECONNREFUSED/);
  });
});
