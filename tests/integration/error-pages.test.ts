// Issue 13 item 2: an error inside the staff shell keeps the staff navigation; an error on a
// participant's phone page keeps the phone shell; a malformed id names what was not found.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CourseRole } from '#app/utils/roles';
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

type Person = 'instructor' | 'researcher' | 'participant' | 'outsider';

const CASES: {
  what: string;
  who: Person;
  path: (ids: { course: number; session: number }) => string;
  status: number;
  says: string;
  shell: 'staff' | 'phone' | 'none';
}[] = [
  {
    what: 'a 404 inside the staff shell keeps the staff navigation and says what was not found',
    who: 'instructor',
    path: ({ course }) => `/courses/${course}/designs/999999999`,
    status: 404,
    says: 'No such design in this course.',
    shell: 'staff',
  },
  {
    what: 'a 403 inside the staff shell keeps the staff navigation',
    who: 'researcher',
    path: ({ course }) => `/courses/${course}/roster`,
    status: 403,
    says: 'Your role in this course (researcher) does not open this page.',
    shell: 'staff',
  },
  // parseId used to say "No such course." whatever the id named
  {
    what: 'a malformed design id',
    who: 'instructor',
    path: ({ course }) => `/courses/${course}/designs/abc`,
    status: 404,
    says: 'No such design.',
    shell: 'staff',
  },
  {
    what: 'a malformed dataset id',
    who: 'instructor',
    path: ({ course }) => `/courses/${course}/datasets/0/estimate`,
    status: 404,
    says: 'No such dataset.',
    shell: 'staff',
  },
  { what: 'a malformed course id', who: 'instructor', path: () => '/courses/abc', status: 404, says: 'No such course.', shell: 'staff' },
  {
    what: 'a 403 on a participant page (not in the course) keeps the phone shell',
    who: 'outsider',
    path: ({ course, session }) => `/courses/${course}/debrief/${session}/mine`,
    status: 403,
    says: 'You are not a member of this course.',
    shell: 'phone',
  },
  {
    what: 'a 404 on a participant page (did not take part) keeps the phone shell',
    who: 'participant',
    path: ({ course, session }) => `/courses/${course}/debrief/${session}/mine`,
    status: 404,
    says: 'You did not take part in this session, so it has no summary for you.',
    shell: 'phone',
  },
  {
    what: 'an unknown address has the error page alone',
    who: 'participant',
    path: () => '/no/such/page',
    status: 404,
    says: 'There is no page at this address',
    shell: 'none',
  },
];

describe('error pages keep their shell', () => {
  const ids = { course: 0, session: 0 };
  const clients = {} as Record<Person, Client>;

  beforeAll(async () => {
    const roles: Record<Exclude<Person, 'outsider'>, CourseRole> = {
      instructor: 'instructor',
      researcher: 'researcher',
      participant: 'participant',
    };
    const userIds = {} as Record<Person, number>;
    for (const who of [...Object.keys(roles), 'outsider'] as Person[]) {
      const email = uniqueEmail(`err-${who}`);
      userIds[who] = await createUser(email);
      clients[who] = await signIn(email);
    }
    ids.course = await createCourse(
      'Error pages course',
      Object.entries(roles).map(([who, role]) => ({ userId: userIds[who as Person], role })),
    );
    // an open session nobody has joined yet
    ({ sessionId: ids.session } = await openSession(clients.instructor, ids.course, await createDesign(ids.course, userIds.instructor)));
  });

  it.each(CASES)('$what', async ({ who, path, status, says, shell }) => {
    const res = await clients[who].get(path(ids));
    expect(res.status).toBe(status);
    const html = await page(res);
    expect(html).toContain(`Error ${status}`);
    expect(html).toContain(says);
    expect(html.includes(STAFF_NAV), 'staff navigation').toBe(shell === 'staff');
    expect(html.includes(PHONE_HEADER), 'a shell header').toBe(shell !== 'none');
  });
});
