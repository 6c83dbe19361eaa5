// The Sessions page (issue 12, staff pages): the newest session first, whatever dates the demo's
// sessions carry, and a join code only while it still admits anyone.
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { closeTestDb, createCourse, createUser } from '#tests/helpers/db';
import { signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, openSession } from '#tests/helpers/live';

afterEach(closeSockets);
afterAll(closeTestDb);

describe('the Sessions page', () => {
  it('lists the newest session first and hides the join code of a session that is over', async () => {
    const email = uniqueEmail('list-inst');
    const id = await createUser(email);
    const courseId = await createCourse('Sessions list', [{ userId: id, role: 'instructor' }]);
    const instructor = await signIn(email);
    const designId = await createDesign(courseId, id);
    const first = await openSession(instructor, courseId, designId);
    const staff = await connect(instructor.cookieHeader());
    expect(await staff.emitWithAck('session:control', { sessionId: first.sessionId, command: 'cancel' })).toMatchObject({ ok: true });
    const second = await openSession(instructor, courseId, designId);

    const page = await (await instructor.get(`/courses/${courseId}/sessions`)).text();
    const at = (sessionId: number) => page.indexOf(`/courses/${courseId}/sessions/${sessionId}"`);
    expect(at(second.sessionId)).toBeGreaterThan(-1);
    expect(at(first.sessionId)).toBeGreaterThan(at(second.sessionId));
    expect(page).toContain(second.code);
    expect(page).not.toContain(first.code);
  });
});
