// Issue 9 #5: a roster's names were written to users.name, the account's one name, so a roster
// uploaded to course A decided what course B (and every mail) called the person. The name now
// belongs to the course membership.
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { users } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';

afterAll(closeTestDb);

async function instructorOfNewCourse(title: string): Promise<[Client, number]> {
  const email = uniqueEmail('names-inst');
  const courseId = await createCourse(title, [{ userId: await createUser(email), role: 'instructor' }]);
  return [await signIn(email), courseId];
}

const importRoster = (c: Client, courseId: number, csv: string) =>
  c.post(`/courses/${courseId}/roster`, { intent: 'import', fileName: 'roster.csv', csv });

describe('roster names stay in their course', () => {
  it('course A’s roster name changes neither course B’s members page nor the account', async () => {
    const student = uniqueEmail('names-student');
    const [a, courseA] = await instructorOfNewCourse('Names course A');
    const [b, courseB] = await instructorOfNewCourse('Names course B');

    expect((await importRoster(b, courseB, `email,name,student id\n${student},Bea Proper,B-1\n`)).status).toBe(200);
    expect((await importRoster(a, courseA, `email,name,student id\n${student},Mallory Chosen Name,A-1\n`)).status).toBe(200);

    const pageB = pageText(await (await b.get(`/courses/${courseB}/members`)).text());
    expect(pageB).toContain('Bea Proper');
    expect(pageB).not.toContain('Mallory Chosen Name');
    const pageA = pageText(await (await a.get(`/courses/${courseA}/members`)).text());
    expect(pageA).toContain('Mallory Chosen Name');
    expect(pageA).not.toContain('Bea Proper');

    const [u] = await testDb().select({ name: users.name }).from(users).where(eq(users.email, student));
    expect(u.name).toBeNull();

    // and a course that enrols the person later does not inherit either name
    const [c, courseC] = await instructorOfNewCourse('Names course C');
    expect((await importRoster(c, courseC, `email,name,student id\n${student},Cy Third,C-1\n`)).status).toBe(200);
    const pageC = pageText(await (await c.get(`/courses/${courseC}/members`)).text());
    expect(pageC).toContain('Cy Third');
    expect(pageC).not.toMatch(/Mallory Chosen Name|Bea Proper/);
  });
});
