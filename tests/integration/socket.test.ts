import { io, type Socket } from 'socket.io-client';
import { afterEach, describe, expect, it } from 'vitest';
import type { ClientToServerEvents, ServerToClientEvents } from '#realtime/protocol';
import { baseUrl, signIn, uniqueEmail } from '#tests/helpers/http';

const open: Socket[] = [];
afterEach(() => {
  while (open.length) open.pop()!.close();
});

function connect(cookie?: string): Socket<ServerToClientEvents, ClientToServerEvents> {
  const s = io(baseUrl(), { transports: ['websocket'], extraHeaders: cookie ? { cookie } : {}, reconnection: false, forceNew: true });
  open.push(s);
  return s;
}

describe('socket hub', () => {
  it('refuses a socket without the sign-in cookie', async () => {
    const s = connect();
    const err = await new Promise<Error>((resolve) => s.on('connect_error', resolve));
    expect(err.message).toBe('unauthorized');
  });

  it('refuses a forged cookie', async () => {
    const s = connect('__parley_auth=eyJ1c2VySWQiOjF9.forged');
    const err = await new Promise<Error>((resolve) => s.on('connect_error', resolve));
    expect(err.message).toBe('unauthorized');
  });

  it('accepts the same signed cookie the pages use and acknowledges events', async () => {
    const c = await signIn(uniqueEmail('sock'));
    const s = connect(c.cookieHeader());
    await new Promise<void>((resolve, reject) => {
      s.on('connect', resolve);
      s.on('connect_error', reject);
    });
    const ack = await s.emitWithAck('me:get', {});
    expect(ack.ok).toBe(true);
    if (ack.ok) expect(ack.data.userId).toBeGreaterThan(0);
    const bad = await s.emitWithAck('me:get', { extra: 1 } as never);
    expect(bad).toMatchObject({ ok: false, code: 'bad-payload' });
  });
});
