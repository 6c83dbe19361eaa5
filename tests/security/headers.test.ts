// Issue 9, finding 10: no CSP, frame-ancestors, nosniff or Referrer-Policy; a same-site iframe
// rendered the members page with its controls; personal-data pages were cacheable.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { baseUrl, type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

let instructor: Client;
let courseId: number;
let synthetic: Awaited<ReturnType<typeof insertSyntheticSession>>;

beforeAll(async () => {
  const email = uniqueEmail('headers');
  const id = await createUser(email, 'Headers Instructor');
  courseId = await createCourse(`Headers course ${Date.now().toString(36)}`, [{ userId: id, role: 'instructor' }]);
  synthetic = await insertSyntheticSession(testDb(), {
    courseId,
    createdBy: id,
    participants: 2,
    lengths: [1],
    seed: 9,
    tag: `headers-${Date.now().toString(36)}`,
  });
  instructor = await signIn(email);
});

afterAll(async () => {
  await synthetic?.remove();
  await closeTestDb();
});

/** The CSP as a map of directive → sources. */
function policy(res: Response): Map<string, string[]> {
  const header = res.headers.get('content-security-policy');
  expect(header).toBeTruthy();
  return new Map(
    header!
      .split(';')
      .map((d) => d.trim().split(/\s+/))
      .filter((d) => d[0])
      .map(([name, ...sources]) => [name, sources]),
  );
}

describe('security headers', () => {
  it('a page forbids framing, sniffing and cross-site referrers, with a nonce-based CSP its scripts carry', async () => {
    const res = await instructor.get(`/courses/${courseId}/members`);
    expect(res.status).toBe(200);
    expect(res.headers.get('x-frame-options')).toBe('DENY');
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    expect(res.headers.get('referrer-policy')).toBe('same-origin');
    const csp = policy(res);
    expect(csp.get('frame-ancestors')).toEqual(["'none'"]);
    expect(csp.get('object-src')).toEqual(["'none'"]);
    const scriptSrc = csp.get('script-src')!;
    expect(scriptSrc).not.toContain("'unsafe-inline'");
    expect(scriptSrc).not.toContain("'unsafe-eval'");
    const nonce = /^'nonce-(.+)'$/.exec(scriptSrc.find((s) => s.startsWith("'nonce-"))!)?.[1];
    expect(nonce).toMatch(/^[A-Za-z0-9+/]{22}==$/);

    // Every inline script of the page carries that nonce (else the browser would not run it).
    const html = await res.text();
    const scripts = [...html.matchAll(/<script\b([^>]*)>/g)].map((m) => m[1]);
    expect(scripts.length).toBeGreaterThan(0);
    for (const attrs of scripts) expect(attrs).toContain(`nonce="${nonce}"`);
  });

  it('makes a new nonce for every request and ignores one a client sends', async () => {
    const forged = 'AAAAAAAAAAAAAAAAAAAAAA==';
    const nonces = await Promise.all(
      [1, 2, 3].map(async () => {
        const res = await fetch(new URL('/sign-in', baseUrl()), { headers: { 'x-parley-csp-nonce': forged } });
        const html = await res.text();
        expect(html).not.toContain(forged);
        return /'nonce-([^']+)'/.exec(res.headers.get('content-security-policy')!)![1];
      }),
    );
    expect(new Set(nonces).size).toBe(3);
    expect(nonces).not.toContain(forged);
  });

  it('no page or download with personal data may be stored by a cache; static assets may', async () => {
    const personal = [
      `/courses/${courseId}/members`,
      `/courses/${courseId}/members.data`,
      `/courses/${courseId}/sessions/${synthetic.sessionId}/result-mails`,
      `/courses/${courseId}/sessions/${synthetic.sessionId}/credit.csv`,
      '/courses',
    ];
    for (const path of personal) {
      const res = await instructor.get(path);
      expect(res.status, path).toBe(200);
      expect(res.headers.get('cache-control'), path).toBe('no-store');
    }
    const page = await (await instructor.get('/courses')).text();
    const asset = /\/assets\/[^"]+\.js/.exec(page)![0];
    const res = await instructor.get(asset);
    expect(res.status).toBe(200);
    expect(res.headers.get('cache-control')).toContain('immutable');
  });

  it('refusals carry the headers too', async () => {
    const res = await fetch(new URL('/sign-out', baseUrl()), { method: 'POST', headers: { origin: 'http://evil.example' } });
    expect(res.status).toBe(403);
    expect(res.headers.get('x-frame-options')).toBe('DENY');
    expect(policy(res).get('frame-ancestors')).toEqual(["'none'"]);
  });
});
