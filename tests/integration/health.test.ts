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
