// A design used by a session is read-only: saving it is refused, and "Make a new version" makes an
// editable copy linked to it, while the old design and its sessions stay as they ran (issue 10).
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb } from '#app/utils/db.server';
import { designs, sessions } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { designForm } from '#tests/helpers/live';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

const form = (over: Record<string, string> = {}) => designForm({ name: 'Versioned', ...over });

const idIn = (location: string | null) => Number(/designs\/(\d+)/.exec(location ?? '')![1]);
const designRow = async (id: number) => (await testDb().select().from(designs).where(eq(designs.id, id)))[0];

let courseId: number;
let instructor: Client;
let assistant: Client;

beforeAll(async () => {
  const [i, a] = [uniqueEmail('v-inst'), uniqueEmail('v-asst')];
  courseId = await createCourse('Versions course', [
    { userId: await createUser(i), role: 'instructor' },
    { userId: await createUser(a), role: 'assistant' },
  ]);
  instructor = await signIn(i);
  assistant = await signIn(a);
});

/** Opens a session from a design through the sessions page, as the instructor does. */
async function openSession(designId: number) {
  const res = await instructor.post(`/courses/${courseId}/sessions`, { designId, seed: '', admission: 'open', emailDomain: '' });
  expect(res.status).toBe(302);
  return Number(/sessions\/(\d+)/.exec(res.headers.get('location')!)![1]);
}

describe('a design used by a session', () => {
  it('stays editable until a session uses it, then refuses to save and says why', async () => {
    const id = idIn((await instructor.post(`/courses/${courseId}/designs/new`, form())).headers.get('location'));
    expect((await instructor.post(`/courses/${courseId}/designs/${id}`, form({ delta: '0.8' }))).status).toBe(200);
    expect(((await designRow(id)).params as { delta: number }).delta).toBe(0.8);

    const sessionId = await openSession(id);
    const refused = await instructor.post(`/courses/${courseId}/designs/${id}`, form({ delta: '0.5', name: 'Changed after use' }));
    expect(refused.status).toBe(409);
    expect(pageText(await refused.text())).toContain(
      'This design was used by a session, so it stays as they ran it and cannot be changed. Make a new version to change it.',
    );
    const after = await designRow(id);
    expect(after.name).toBe('Versioned');
    expect((after.params as { delta: number }).delta).toBe(0.8);

    const page = pageText(await (await instructor.get(`/courses/${courseId}/designs/${id}`)).text());
    expect(page).toContain('Read-only: used by a session');
    expect(page).toContain(
      'A session was opened from this design, so it stays exactly as they ran it (treatment R40 S12 T50 P25, δ = 0.8, random termination)',
    );
    expect(page).toContain('Make a new version');
    expect(page).not.toContain('Save design');
    // assistants see why, but no button
    const seen = pageText(await (await assistant.get(`/courses/${courseId}/designs/${id}`)).text());
    expect(seen).toContain('Read-only: used by a session');
    expect(seen).not.toContain('Make a new version');

    const [s] = await testDb().select().from(sessions).where(eq(sessions.id, sessionId));
    expect(s.treatment).toBe('Versioned');
  });

  it('"Make a new version" makes an editable v2 linked to it; the old one and its sessions do not change', async () => {
    const id = idIn((await instructor.post(`/courses/${courseId}/designs/new`, form({ name: 'Baseline' }))).headers.get('location'));
    const oldSession = await openSession(id);
    expect((await assistant.post(`/courses/${courseId}/designs/${id}`, { intent: 'new-version' })).status).toBe(403);

    const made = await instructor.post(`/courses/${courseId}/designs/${id}`, { intent: 'new-version' });
    expect(made.status).toBe(302);
    const v2 = idIn(made.headers.get('location'));
    expect(v2).not.toBe(id);
    const row = await designRow(v2);
    expect(row).toMatchObject({ courseId, name: 'Baseline', previousId: id, version: 2 });
    expect(row.params).toEqual((await designRow(id)).params);

    const page = pageText(await (await instructor.get(`/courses/${courseId}/designs/${v2}?version=new`)).text());
    expect(page).toContain('v2 of Baseline (v1)');
    expect(page).toContain('New version v2 made.');
    expect(page).toContain('Save design');

    expect((await instructor.post(`/courses/${courseId}/designs/${v2}`, form({ name: 'Baseline', delta: '0.5' }))).status).toBe(200);
    expect(((await designRow(v2)).params as { delta: number }).delta).toBe(0.5);
    expect(((await designRow(id)).params as { delta: number }).delta).toBe(0.75);

    // the new version's sessions carry its version in the treatment column; the old session is untouched
    const newSession = await openSession(v2);
    const rows = await testDb().select().from(sessions).where(eq(sessions.courseId, courseId));
    const byId = new Map(rows.map((r) => [r.id, r]));
    expect(byId.get(newSession)!.treatment).toBe('Baseline (v2)');
    expect((byId.get(newSession)!.params as { delta: number }).delta).toBe(0.5);
    expect(byId.get(oldSession)!.treatment).toBe('Baseline');
    expect((byId.get(oldSession)!.params as { delta: number }).delta).toBe(0.75);

    // a second new version from v1 is v3, not another v2
    const v3 = idIn((await instructor.post(`/courses/${courseId}/designs/${id}`, { intent: 'new-version' })).headers.get('location'));
    expect((await designRow(v3)).version).toBe(3);
    const list = pageText(await (await instructor.get(`/courses/${courseId}/designs`)).text());
    expect(list).toContain('Baseline (v2)');
    expect(list).toContain('1 · read-only');
  });
});
