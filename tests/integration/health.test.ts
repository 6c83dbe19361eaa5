import net from 'node:net';
import { expect, it } from 'vitest';
import { Client } from '#tests/helpers/http';

it('/healthz answers 200 when MariaDB answers', async () => {
  const res = await new Client().get('/healthz');
  expect(res.status).toBe(200);
  expect(await res.json()).toEqual({ ok: true, database: 'up', live: 'ok' });
});

it('unknown pages answer 404 with Parley’s page', async () => {
  const res = await new Client().get('/no/such/page');
  expect(res.status).toBe(404);
  expect(await res.text()).toContain('Nothing here');
});

// A load balancer's health check may speak HTTP/1.0 with no Host header (HAProxy's plain
// `option httpchk` does): it must get the health answer, not a 500 (found with the cluster's HAProxy).
it('/healthz answers an HTTP/1.0 request without a Host header', async () => {
  const { port } = new URL(process.env.PARLEY_TEST_URL!);
  const raw = await new Promise<string>((resolve, reject) => {
    const s = net.connect({ host: '127.0.0.1', port: Number(port) }, () => s.write('GET /healthz HTTP/1.0\r\n\r\n'));
    let buf = '';
    s.on('data', (d) => (buf += d.toString()));
    s.on('end', () => resolve(buf));
    s.on('error', reject);
  });
  expect(raw.split('\r\n')[0]).toBe('HTTP/1.1 200 OK');
  expect(raw).toContain('"database":"up"');
});
