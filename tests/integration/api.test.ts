import { createHash } from 'node:crypto';
import { eq } from 'drizzle-orm';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PANEL_COLUMNS } from '#app/lib/panel-codebook';
import { apiTokens, estimates } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { baseUrl, type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

const api = (path: string, token?: string | null, init: RequestInit = {}) =>
  fetch(new URL(`/api/v1${path}`, baseUrl()), {
    ...init,
    headers: { ...(token ? { authorization: `Bearer ${token}` } : {}), ...init.headers },
  });

async function apiJson(path: string, token?: string | null) {
  const res = await api(path, token);
  expect(res.headers.get('content-type')).toContain('application/json');
  return {
    status: res.status,
    // the API's bodies differ per route; each test reads the fields it checks
    // eslint-disable-next-line @typescript-eslint/no-explicit-any
    body: (await res.json()) as { data?: any; next_cursor?: string | null; error?: { code: string; message: string } },
  };
}

/** Creates a token through the settings page, as a person does, and reads it off the page. */
async function createToken(client: Client, name: string, courseId: number) {
  const res = await client.post('/settings/tokens', { intent: 'create', name, courseId });
  const html = await res.text();
  return { status: res.status, token: /prl_[A-Za-z0-9_-]{43}/.exec(html)?.[0] ?? null };
}

let researcher: Client;
let courseA: number;
let courseB: number;
let token: string;
let session: Awaited<ReturnType<typeof insertSyntheticSession>>;
let sessionB: Awaited<ReturnType<typeof insertSyntheticSession>>;

beforeAll(async () => {
  const instructorId = await createUser(uniqueEmail('instr'));
  const researcherEmail = uniqueEmail('res');
  const researcherId = await createUser(researcherEmail);
  courseA = await createCourse('API course A', [
    { userId: instructorId, role: 'instructor' },
    { userId: researcherId, role: 'researcher' },
  ]);
  courseB = await createCourse('API course B', [{ userId: instructorId, role: 'instructor' }]);
  session = await insertSyntheticSession(testDb(), {
    courseId: courseA,
    createdBy: instructorId,
    participants: 4,
    lengths: [2, 3],
    seed: 21,
  });
  sessionB = await insertSyntheticSession(testDb(), {
    courseId: courseB,
    createdBy: instructorId,
    participants: 2,
    lengths: [1],
    seed: 22,
  });
  await testDb()
    .insert(estimates)
    .values([
      {
        courseId: courseA,
        request: { sessions: [session.sessionId] },
        requestKey: 'k1',
        status: 'done',
        result: { ok: 1 },
        createdBy: instructorId,
      },
      { courseId: courseA, request: { sessions: [session.sessionId] }, requestKey: 'k2', status: 'queued', createdBy: instructorId },
      { courseId: courseB, request: {}, requestKey: 'k3', status: 'queued', createdBy: instructorId },
    ]);
  researcher = await signIn(researcherEmail);
  const created = await createToken(researcher, 'R scripts', courseA);
  expect(created.status).toBe(200);
  token = created.token!;
});

afterAll(async () => {
  await session?.remove();
  await sessionB?.remove();
  await closeTestDb();
});

describe('API tokens', () => {
  it('are shown once and stored only as a SHA-256 fingerprint', async () => {
    const [row] = await testDb()
      .select()
      .from(apiTokens)
      .where(eq(apiTokens.tokenHash, createHash('sha256').update(token).digest('hex')));
    expect(row).toMatchObject({ name: 'R scripts', courseIds: [courseA], prefix: token.slice(0, 12), revokedAt: null, lastUsedAt: null });
    expect(JSON.stringify(row)).not.toContain(token);
    // the list shows the prefix, never the token
    const page = await (await researcher.get('/settings/tokens')).text();
    expect(page).toContain(token.slice(0, 12));
    expect(page).not.toContain(token);
  });

  it('cannot be scoped to a course where the owner is not instructor or researcher', async () => {
    const res = await createToken(researcher, 'sneaky', courseB);
    expect(res.status).toBe(403);
    expect(res.token).toBeNull();
  });
});

describe('/api/v1 refuses', () => {
  it('a missing, malformed or wrong token with 401 and a JSON error', async () => {
    expect(await apiJson('/courses')).toEqual({
      status: 401,
      body: { error: { code: 'missing_token', message: expect.stringContaining('Bearer') } },
    });
    const malformed = await api('/courses', null, { headers: { authorization: `Token ${token}` } });
    expect(malformed.status).toBe(401);
    expect(((await malformed.json()) as { error: { code: string } }).error.code).toBe('invalid_token');
    expect((await apiJson('/courses', 'prl_' + 'x'.repeat(43))).body.error?.code).toBe('invalid_token');
    expect((await apiJson(`/courses/${courseA}`, token.slice(0, -1))).status).toBe(401);
  });

  it('an out-of-scope course or session with 403, an unknown one with 404', async () => {
    expect(await apiJson(`/courses/${courseB}`, token)).toEqual({
      status: 403,
      body: { error: { code: 'out_of_scope', message: expect.any(String) } },
    });
    expect((await apiJson(`/courses/${courseB}/sessions`, token)).status).toBe(403);
    expect((await apiJson(`/courses/${courseB}/estimates`, token)).status).toBe(403);
    expect((await apiJson(`/sessions/${sessionB.sessionId}`, token)).status).toBe(403);
    expect((await apiJson(`/sessions/${sessionB.sessionId}/panel`, token)).status).toBe(403);
    expect((await apiJson('/courses/999999', token)).body.error?.code).toBe('not_found');
    expect((await apiJson('/sessions/999999/panel', token)).status).toBe(404);
    expect((await apiJson('/sessions/abc', token)).status).toBe(404);
    expect((await apiJson('/no-such-thing', token)).status).toBe(404);
    expect((await apiJson(`/courses/${courseA}/sessions?limit=0`, token)).status).toBe(400);
    expect((await apiJson(`/courses/${courseA}/sessions?cursor=bogus`, token)).status).toBe(400);
    const post = await api('/courses', token, { method: 'POST' });
    expect(post.status).toBe(405);
  });
});

describe('/api/v1 serves', () => {
  it('courses, sessions and estimates, page by page', async () => {
    const courses = await apiJson('/courses', token);
    expect(courses).toEqual({
      status: 200,
      body: {
        data: [{ id: courseA, title: 'API course A', institution: null, term: null, is_demo: false, role: 'researcher' }],
        next_cursor: null,
      },
    });
    expect((await apiJson(`/courses/${courseA}`, token)).body.data).toMatchObject({ id: courseA, role: 'researcher' });

    const second = await insertSyntheticSession(testDb(), {
      courseId: courseA,
      createdBy: session.userIds[0],
      participants: 2,
      lengths: [1],
      seed: 23,
    });
    try {
      const p1 = await apiJson(`/courses/${courseA}/sessions?limit=1`, token);
      expect(p1.body.data).toHaveLength(1);
      expect(p1.body.data[0]).toMatchObject({
        id: session.sessionId,
        status: 'complete',
        delta: 0.75,
        payoffs: { R: 40, S: 12, T: 50, P: 25 },
      });
      const p2 = await apiJson(`/courses/${courseA}/sessions?limit=1&cursor=${p1.body.next_cursor}`, token);
      expect(p2.body.data.map((s: { id: number }) => s.id)).toEqual([second.sessionId]);
      expect(p2.body.next_cursor).toBeNull();
    } finally {
      await second.remove();
    }
    const est = await apiJson(`/courses/${courseA}/estimates?limit=1`, token);
    expect(est.body.data).toEqual([expect.objectContaining({ status: 'done', result: { ok: 1 } })]);
    const est2 = await apiJson(`/courses/${courseA}/estimates?limit=1&cursor=${est.body.next_cursor}`, token);
    expect(est2.body).toEqual({ data: [expect.objectContaining({ status: 'queued' })], next_cursor: null });
  });

  it('the choice panel as JSON pages (limit/cursor) and as CSV, the same rows, de-identified', async () => {
    const rows: Record<string, unknown>[] = [];
    let cursor: string | null = null;
    let pages = 0;
    do {
      const res = await apiJson(`/sessions/${session.sessionId}/panel?limit=7${cursor ? `&cursor=${cursor}` : ''}`, token);
      expect(res.status).toBe(200);
      expect(res.body.data.length).toBeLessThanOrEqual(7);
      rows.push(...res.body.data);
      cursor = res.body.next_cursor ?? null;
      pages += 1;
    } while (cursor && pages < 100);
    // 4 people × (2 + 3) rounds
    expect(rows).toHaveLength(20);
    expect(pages).toBe(3);
    const csv = await api(`/sessions/${session.sessionId}/panel?format=csv`, token);
    expect(csv.headers.get('content-type')).toContain('text/csv');
    const parsed = Papa.parse<Record<string, unknown>>(await csv.text(), {
      header: true,
      skipEmptyLines: true,
      dynamicTyping: (c) => c !== 'timestamp',
    });
    expect(parsed.data).toEqual(rows);
    expect(Object.keys(rows[0])).toEqual(PANEL_COLUMNS);
  });

  it('records the last use, and a revoked token stops working', async () => {
    const [row] = await testDb()
      .select()
      .from(apiTokens)
      .where(eq(apiTokens.tokenHash, createHash('sha256').update(token).digest('hex')));
    expect(row.lastUsedAt).toBeInstanceOf(Date);
    const res = await researcher.post('/settings/tokens', { intent: 'revoke', id: row.id });
    expect(res.status).toBe(200);
    expect(await apiJson('/courses', token)).toEqual({
      status: 401,
      body: { error: { code: 'revoked_token', message: expect.any(String) } },
    });
  });
});
