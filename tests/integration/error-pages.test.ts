// Issue 13 item 2: an error inside the staff shell keeps the staff navigation; an error on a
// participant's phone page keeps the phone shell; a malformed id names what was not found.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestDb, createCourse, createUser } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { createDesign, openSession } from '#tests/helpers/live';

afterAll(closeTestDb);

/** The page's HTML without the comments React puts between adjacent text nodes ("Error <!-- -->404"). */
const page = async (res: Response) => (await res.text()).replaceAll('<!-- -->', '');

/** The staff shell's navigation (app/components/shells.tsx StaffShell). */
const STAFF_NAV = 'aria-label="Main"';
/** The phone shell's header (ParticipantShell); a bare error page has none. */
const PHONE_HEADER = '<header';

describe('error pages keep their shell', () => {
  let courseId: number;
  let sessionId: number;
  let instructor: Client;
  let researcher: Client;
  let participant: Client;
  let outsider: Client;

  beforeAll(async () => {
    const emails = {
      inst: uniqueEmail('err-inst'),
      res: uniqueEmail('err-res'),
      part: uniqueEmail('err-part'),
      out: uniqueEmail('err-out'),
    };
    const instId = await createUser(emails.inst);
    const resId = await createUser(emails.res);
    const partId = await createUser(emails.part);
    courseId = await createCourse('Error pages course', [
      { userId: instId, role: 'instructor' },
      { userId: resId, role: 'researcher' },
      { userId: partId, role: 'participant' },
    ]);
    await createUser(emails.out);
    [instructor, researcher, participant, outsider] = await Promise.all([
      signIn(emails.inst),
      signIn(emails.res),
      signIn(emails.part),
      signIn(emails.out),
    ]);
    // an open session nobody has joined yet
    ({ sessionId } = await openSession(instructor, courseId, await createDesign(courseId, instId)));
  });

  it('a 404 inside the staff shell still has the staff navigation and says what was not found', async () => {
    const res = await instructor.get(`/courses/${courseId}/designs/999999999`);
    expect(res.status).toBe(404);
    const html = await page(res);
    expect(html).toContain(STAFF_NAV);
    expect(html).toContain('Sign out');
    expect(html).toContain('Error 404');
    expect(html).toContain('No such design in this course.');
  });

  it('a 403 inside the staff shell still has the staff navigation', async () => {
    const res = await researcher.get(`/courses/${courseId}/roster`);
    expect(res.status).toBe(403);
    const html = await page(res);
    expect(html).toContain(STAFF_NAV);
    expect(html).toContain('Error 403');
    expect(html).toContain('Your role in this course (researcher) does not open this page.');
  });

  it('a malformed id is "No such <that thing>", not "No such course."', async () => {
    const design = await instructor.get(`/courses/${courseId}/designs/abc`);
    expect(design.status).toBe(404);
    expect(await page(design)).toContain('No such design.');
    const dataset = await instructor.get(`/courses/${courseId}/datasets/0/estimate`);
    expect(dataset.status).toBe(404);
    expect(await page(dataset)).toContain('No such dataset.');
    const course = await instructor.get('/courses/abc');
    expect(course.status).toBe(404);
    expect(await page(course)).toContain('No such course.');
  });

  it('a 403 on a participant page keeps the phone shell, without the staff navigation', async () => {
    // someone signed in who is not in the course, at a participant's own summary
    const res = await outsider.get(`/courses/${courseId}/debrief/${sessionId}/mine`);
    expect(res.status).toBe(403);
    const html = await page(res);
    expect(html).toContain('Error 403');
    expect(html).toContain('You are not a member of this course.');
    expect(html).toContain(PHONE_HEADER);
    expect(html).not.toContain(STAFF_NAV);
  });

  it('a 404 on a participant page keeps the phone shell', async () => {
    const res = await participant.get(`/courses/${courseId}/debrief/${sessionId}/mine`);
    expect(res.status).toBe(404);
    const html = await page(res);
    expect(html).toContain('Error 404');
    expect(html).toContain('You did not take part in this session, so it has no summary for you.');
    expect(html).toContain(PHONE_HEADER);
    expect(html).not.toContain(STAFF_NAV);
  });

  it('outside both shells (an unknown address) the error page stands alone', async () => {
    const res = await participant.get('/no/such/page');
    expect(res.status).toBe(404);
    const html = await page(res);
    expect(html).toContain('Error 404');
    expect(html).not.toContain(PHONE_HEADER);
    expect(html).not.toContain(STAFF_NAV);
  });
});
