// Issue 9 #5: any signed-in account could create a course (and then mail a roster of strangers).
// Now only site admins, accounts an admin granted, and addresses of INSTRUCTOR_DOMAINS may
// (docs/decisions/023-who-creates-courses.md).
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { courses, users } from '#drizzle/schema';
import { closeTestDb, testDb } from '#tests/helpers/db';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';

afterAll(closeTestDb);

const courseCount = async () => (await testDb().select({ id: courses.id }).from(courses)).length;

async function create(c: Client, title: string) {
  return c.post('/courses/new', { title, institution: 'Test College', term: 'Fall' });
}

/** A fresh address in the first allow-listed domain the test server was given. */
function facultyEmail(prefix: string) {
  const domain = (process.env.INSTRUCTOR_DOMAINS ?? '').split(',')[0]?.trim();
  if (!domain) throw new Error('the test server is started with INSTRUCTOR_DOMAINS (scripts/test.mjs)');
  return uniqueEmail(prefix).replace(/@.*$/, `@${domain}`);
}

describe('who may create a course', () => {
  it('an ordinary signed-in account gets 403 on the page and the action, and nothing is written', async () => {
    const c = await signIn(uniqueEmail('nocreate'));
    const before = await courseCount();
    const page = await c.get('/courses/new');
    expect(page.status).toBe(403);
    const res = await create(c, 'Spam course');
    expect(res.status).toBe(403);
    expect(pageText(await res.text())).toContain('may not create courses');
    expect(await courseCount()).toBe(before);
    // the courses page does not offer what it would refuse
    expect(await (await c.get('/courses')).text()).not.toContain('href="/courses/new"');
  });

  it('an address of an allow-listed domain creates a course (exact domain only, not a subdomain)', async () => {
    const c = await signIn(facultyEmail('faculty'));
    const res = await create(c, 'Faculty course');
    expect(res.status).toBe(302);
    expect(res.headers.get('location')).toMatch(/^\/courses\/\d+$/);
    const sub = await signIn(facultyEmail('student').replace('@', '@students.'));
    expect((await create(sub, 'Subdomain course')).status).toBe(403);
  });

  it('the demo instructor may (seeded grant); a site admin grants and revokes the right on the admin page', async () => {
    const demo = await signIn('r.okafor@halvorsen.example');
    expect((await demo.get('/courses/new')).status).toBe(200);

    const email = uniqueEmail('granted');
    const person = await signIn(email);
    expect((await create(person, 'Before the grant')).status).toBe(403);

    // only admins grant
    expect((await person.post('/admin', { intent: 'grant', email })).status).toBe(403);
    const admin = await signIn('admin@halvorsen.example');
    const granted = await admin.post('/admin', { intent: 'grant', email });
    expect(granted.status).toBe(200);
    expect(pageText(await (await admin.get('/admin')).text())).toContain(email);
    const made = await create(person, 'After the grant');
    expect(made.status).toBe(302);

    const [u] = await testDb().select({ id: users.id }).from(users).where(eq(users.email, email));
    expect((await admin.post('/admin', { intent: 'revoke', userId: u.id })).status).toBe(200);
    expect((await create(person, 'After the revocation')).status).toBe(403);
    // the course made while granted is still theirs to run
    const id = made.headers.get('location')!;
    expect((await person.get(id)).status).toBe(200);
  });
});
