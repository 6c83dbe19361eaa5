// Issue 9, finding 6: resource routes (results e-mails, strategy save, sign-out, estimation) and the
// socket hub accepted requests from another origin on the same site (another port or subdomain of
// the same host, which SameSite cookies do not stop). Every state-changing request and every
// socket handshake is now checked against APP_URL's origin.
import { eq } from 'drizzle-orm';
import { io } from 'socket.io-client';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { courseStrategies, designs, estimates, resultMails } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { baseUrl, type Client, isSignedIn, signIn, uniqueEmail } from '#tests/helpers/http';
import { designForm } from '#tests/helpers/live';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

const app = () => new URL(baseUrl());
/** Another site altogether, and the same host on another port (same site, other origin). */
const foreignOrigins = () => ['http://evil.127.0.0.1.nip.io', `http://127.0.0.1:${Number(app().port) + 1}`, 'null'];

let instructor: Client;
let courseId: number;
let synthetic: Awaited<ReturnType<typeof insertSyntheticSession>>;

beforeAll(async () => {
  const email = uniqueEmail('origin');
  const id = await createUser(email, 'Origin Instructor');
  courseId = await createCourse(`Origin course ${Date.now().toString(36)}`, [{ userId: id, role: 'instructor' }]);
  synthetic = await insertSyntheticSession(testDb(), {
    courseId,
    createdBy: id,
    participants: 2,
    lengths: [1],
    seed: 5,
    tag: `origin-${Date.now().toString(36)}`,
  });
  instructor = await signIn(email);
});

afterAll(async () => {
  await synthetic?.remove();
  await closeTestDb();
});

/** A form POST carrying the signed-in cookie, with the given Origin/Referer headers (or none). */
function postAs(c: Client, path: string, fields: Record<string, string>, headers: Record<string, string>) {
  return fetch(new URL(path, baseUrl()), {
    method: 'POST',
    headers: { cookie: c.cookieHeader(), 'content-type': 'application/x-www-form-urlencoded', ...headers },
    body: new URLSearchParams(fields),
    redirect: 'manual',
  });
}

const designsNamed = async (name: string) => (await testDb().select().from(designs).where(eq(designs.name, name))).length;

const strategy = JSON.stringify({
  id: 'OriginTest',
  name: 'Cooperate, then copy',
  states: [
    { action: 'C', next: { cc: 0, cd: 1, dc: 0, dd: 1 } },
    { action: 'D', next: { cc: 0, cd: 1, dc: 0, dd: 1 } },
  ],
});

describe('state-changing requests from another origin', () => {
  it('sign-out from another origin is refused and the user stays signed in', async () => {
    for (const origin of foreignOrigins()) {
      const res = await postAs(instructor, '/sign-out', {}, { origin });
      expect(res.status).toBe(403);
      expect(res.headers.get('set-cookie')).toBeNull();
    }
    expect(await isSignedIn(instructor)).toBe(true);
  });

  it('resource routes (strategy save, results e-mails, estimation) refuse and change nothing', async () => {
    const saved = async () => (await testDb().select().from(courseStrategies).where(eq(courseStrategies.courseId, courseId))).length;
    const queued = async () => (await testDb().select().from(resultMails).where(eq(resultMails.sessionId, synthetic.sessionId))).length;
    const started = async () => (await testDb().select().from(estimates).where(eq(estimates.courseId, courseId))).length;
    for (const origin of foreignOrigins()) {
      expect((await postAs(instructor, `/courses/${courseId}/strategies`, { automaton: strategy }, { origin })).status).toBe(403);
      expect(
        (await postAs(instructor, `/courses/${courseId}/sessions/${synthetic.sessionId}/result-mails`, { intent: 'send' }, { origin }))
          .status,
      ).toBe(403);
      const est = await postAs(
        instructor,
        `/courses/${courseId}/estimates`,
        { sessions: String(synthetic.sessionId), windowKind: 'all', preset: 'dbf2011', bootstrap: '0', seed: '1' },
        { origin },
      );
      expect(est.status).toBe(403);
      expect(((await est.json()) as { error: { code: string } }).error.code).toBe('cross_origin');
    }
    expect(await saved()).toBe(0);
    expect(await queued()).toBe(0);
    expect(await started()).toBe(0);
    // The same request from our own pages goes through.
    expect((await postAs(instructor, `/courses/${courseId}/strategies`, { automaton: strategy }, { origin: app().origin })).status).toBe(
      200,
    );
    expect(await saved()).toBe(1);
  });

  it('a page action from another origin is refused', async () => {
    const name = `Cross-origin design ${Date.now().toString(36)}`;
    const res = await postAs(instructor, `/courses/${courseId}/designs/new`, designForm({ name }), { origin: foreignOrigins()[1] });
    expect(res.status).toBe(403);
    expect(await designsNamed(name)).toBe(0);
  });

  it('without Origin the Referer decides; with neither a request is refused', async () => {
    const name = `Referer design ${Date.now().toString(36)}`;
    const path = `/courses/${courseId}/designs/new`;
    expect((await postAs(instructor, path, designForm({ name }), { referer: `${foreignOrigins()[1]}${path}` })).status).toBe(403);
    expect((await postAs(instructor, path, designForm({ name }), {})).status).toBe(403);
    expect(await designsNamed(name)).toBe(0);
    const ok = await postAs(instructor, path, designForm({ name }), { referer: `${app().origin}${path}` });
    expect(ok.status).toBe(302);
    expect(await designsNamed(name)).toBe(1);
  });
});

describe('socket handshakes', () => {
  const open: ReturnType<typeof io>[] = [];
  afterEach(() => {
    while (open.length) open.pop()!.close();
  });

  function handshake(origin: string | undefined, transport: 'websocket' | 'polling') {
    const s = io(baseUrl(), {
      transports: [transport],
      extraHeaders: { cookie: instructor.cookieHeader(), ...(origin ? { origin } : {}) },
      reconnection: false,
      forceNew: true,
    });
    open.push(s);
    return new Promise<'connected' | string>((resolve) => {
      s.on('connect', () => resolve('connected'));
      s.on('connect_error', (e) => resolve(e.message));
    });
  }

  it('refuses a handshake from another origin, over WebSocket and long-polling', async () => {
    for (const origin of foreignOrigins()) {
      expect(await handshake(origin, 'websocket')).not.toBe('connected');
      expect(await handshake(origin, 'polling')).not.toBe('connected');
    }
  });

  it('accepts our own origin, and a client outside the browser that sends none', async () => {
    expect(await handshake(app().origin, 'websocket')).toBe('connected');
    expect(await handshake(app().origin, 'polling')).toBe('connected');
    expect(await handshake(undefined, 'websocket')).toBe('connected');
  });
});
