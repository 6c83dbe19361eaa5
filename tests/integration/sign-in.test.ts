import { and, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { authEvents, users } from '#drizzle/schema';
import { closeTestDb, testDb } from '#tests/helpers/db';
import { Client, isSignedIn, signIn, uniqueEmail } from '#tests/helpers/http';
import { latestSignInCode, mailTo } from '#tests/helpers/mail';

afterAll(closeTestDb);

/** Page text without React's text-node separators. */
const html = (s: string) => s.replaceAll('<!-- -->', '');

describe('sign-in by e-mailed one-time code', () => {
  it('refuses an invalid e-mail with a field error and sends nothing', async () => {
    const c = new Client();
    const res = await c.post('/sign-in', { email: 'not-an-address' });
    expect(res.status).toBe(400);
    const html = await res.text();
    expect(html).toContain('Enter an e-mail address such as name@university.edu.');
    expect(await mailTo('not-an-address')).toHaveLength(0);
  });

  it('e-mails a code with text and HTML parts and a magic link, then signs in and creates the user', async () => {
    const email = uniqueEmail('new');
    const c = new Client();
    const r1 = await c.post('/sign-in', { email: email.toUpperCase() });
    expect(r1.status).toBe(302);
    expect(r1.headers.get('location')).toBe('/sign-in/code');
    const { code, mail, magicLink } = await latestSignInCode(email);
    expect(code).toMatch(/^\d{6}$/);
    expect(mail.text).toContain(code);
    expect(mail.html).toContain(code);
    expect(magicLink).toMatch(new RegExp(`^${process.env.PARLEY_TEST_URL}/sign-in/link\\?`));

    const page = await c.get('/sign-in/code');
    expect(await page.text()).toContain(email);

    const r2 = await c.post('/sign-in/code', { intent: 'verify', code });
    expect(r2.status).toBe(302);
    expect(await isSignedIn(c)).toBe(true);
    const [u] = await testDb().select().from(users).where(eq(users.email, email));
    expect(u?.email).toBe(email);
  });

  it('signs in through the magic link on the same device', async () => {
    const email = uniqueEmail('link');
    const c = new Client();
    await c.post('/sign-in', { email });
    const { magicLink } = await latestSignInCode(email);
    const url = new URL(magicLink!);
    const res = await c.get(url.pathname + url.search);
    expect(res.status).toBe(302);
    expect(await isSignedIn(c)).toBe(true);
  });

  it('answers a wrong code with a clear message and counts the attempt', async () => {
    const email = uniqueEmail('wrong');
    const c = new Client();
    await c.post('/sign-in', { email });
    const { code } = await latestSignInCode(email);
    const wrong = code === '000000' ? '111111' : '000000';
    const res = await c.post('/sign-in/code', { intent: 'verify', code: wrong });
    expect(res.status).toBe(302);
    expect(res.headers.get('location')).toBe('/sign-in/code');
    expect(await isSignedIn(c)).toBe(false);
    const page = await (await c.get('/sign-in/code')).text();
    expect(page).toContain('That code is not right.');
    const failures = await testDb()
      .select()
      .from(authEvents)
      .where(and(eq(authEvents.kind, 'code-failure'), eq(authEvents.email, email)));
    expect(failures).toHaveLength(1);
  });

  it('rejects a malformed code without asking the strategy', async () => {
    const email = uniqueEmail('short');
    const c = new Client();
    await c.post('/sign-in', { email });
    const res = await c.post('/sign-in/code', { intent: 'verify', code: '12ab' });
    expect(res.status).toBe(400);
    expect(await res.text()).toContain('The code has six digits.');
  });

  it('stops accepting a code after five wrong tries, even the right one', async () => {
    const email = uniqueEmail('brute');
    const c = new Client();
    await c.post('/sign-in', { email });
    const { code } = await latestSignInCode(email);
    const wrong = code === '000000' ? '111111' : '000000';
    for (let i = 0; i < 5; i++) await c.post('/sign-in/code', { intent: 'verify', code: wrong });
    const res = await c.post('/sign-in/code', { intent: 'verify', code });
    expect(res.status).toBe(429);
    expect(html(await res.text())).toContain('That code was typed wrong too often and no longer works. Ask for a new code.');
    expect(await isSignedIn(c)).toBe(false);
  });

  it('limits code requests per e-mail address with a 429 and a retry time', async () => {
    const email = uniqueEmail('flood');
    const c = new Client();
    for (let i = 0; i < 5; i++) expect((await c.post('/sign-in', { email })).status).toBe(302);
    const res = await c.post('/sign-in', { email });
    expect(res.status).toBe(429);
    expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(html(await res.text())).toMatch(/Too many codes were requested for this e-mail address\. Try again in \d+ minutes/);
    expect((await mailTo(email)).length).toBe(5);
  });

  it('signs out', async () => {
    const c = await signIn(uniqueEmail('out'));
    const res = await c.post('/sign-out', {});
    expect(res.status).toBe(302);
    expect(await isSignedIn(c)).toBe(false);
    const courses = await c.get('/courses');
    expect(courses.status).toBe(302);
    expect(courses.headers.get('location')).toBe('/sign-in?redirectTo=%2Fcourses');
  });

  it('returns to the page that asked for sign-in, and never to another host', async () => {
    const email = uniqueEmail('back');
    const c = new Client();
    await c.post('/sign-in', { email, redirectTo: '/courses/new' });
    let { code } = await latestSignInCode(email);
    let res = await c.post('/sign-in/code', { intent: 'verify', code });
    expect(res.headers.get('location')).toBe('/courses/new');

    const d = new Client();
    await d.post('/sign-in', { email, redirectTo: '//evil.example/' });
    ({ code } = await latestSignInCode(email, 2));
    res = await d.post('/sign-in/code', { intent: 'verify', code });
    expect(res.headers.get('location')).toBe('/');
  });
});
