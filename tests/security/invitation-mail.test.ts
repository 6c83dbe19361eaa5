// Issue 9 #5 (mail abuse) and #11 (mail server down, invitations): every invitation and roster
// mail says who sends it and for which course; a course sends at most INVITES_PER_COURSE_PER_DAY
// of them a day; an invitation whose mail failed is shown as not sent, with a Resend button.
import fs from 'node:fs';
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { courseMails, courses, invitations } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';
import { mailTo, waitForMail } from '#tests/helpers/mail';

afterAll(closeTestDb);

const cap = Number(process.env.INVITES_PER_COURSE_PER_DAY ?? 500);

let instructor: Client;
let instructorEmail: string;
let instructorId: number;
let assistant: Client;
/** staff of every course made below (newCourse) */
let assistantId: number;

beforeAll(async () => {
  instructorEmail = uniqueEmail('mail-inst');
  const assistantEmail = uniqueEmail('mail-asst');
  // a display name of their own: the mails must still give the address behind it
  instructorId = await createUser(instructorEmail, 'Dr Mail Tester');
  assistantId = await createUser(assistantEmail);
  [instructor, assistant] = await Promise.all([signIn(instructorEmail), signIn(assistantEmail)]);
});

async function newCourse(title: string) {
  return createCourse(`${title} ${Date.now().toString(36)}`, [
    { userId: instructorId, role: 'instructor' },
    { userId: assistantId, role: 'assistant' },
  ]);
}

const invite = (courseId: number, email: string) =>
  instructor.post(`/courses/${courseId}/members`, { intent: 'invite', email, role: 'assistant' });
const pendingOf = (courseId: number, email: string) =>
  testDb()
    .select()
    .from(invitations)
    .where(and(eq(invitations.courseId, courseId), eq(invitations.email, email)));

describe('mail names its sender and course', () => {
  it('an invitation says who invites, with their address, and to which course, in subject and body', async () => {
    const courseId = await newCourse('Named course');
    const [{ title }] = await testDb().select({ title: courses.title }).from(courses).where(eq(courses.id, courseId));
    const to = uniqueEmail('named-invitee');
    expect((await invite(courseId, to)).status).toBe(200);
    const mail = await waitForMail(to, { subject: /Invitation to/ });
    expect(mail.subject).toContain(title);
    expect(mail.subject).toContain(instructorEmail);
    expect(mail.text).toContain(`Dr Mail Tester (${instructorEmail})`);
    expect(mail.text).toContain(title);
  });

  it('a roster mail says which instructor, with their address, added the person to which course', async () => {
    const courseId = await newCourse('Roster-mail course');
    const student = uniqueEmail('named-student');
    const res = await instructor.post(`/courses/${courseId}/roster`, {
      intent: 'import',
      fileName: 'r.csv',
      csv: `email,name,student id\n${student},Nell Named,N-1\n`,
    });
    expect(res.status).toBe(200);
    const mail = await waitForMail(student, { subject: /roster/ });
    expect(mail.subject).toContain('Roster-mail course');
    expect(mail.text).toContain(`Dr Mail Tester (${instructorEmail})`);
  });
});

describe('invitation mail per course and day', () => {
  it('refuses an invitation past the cap with a clear message; nothing is stored or sent', async () => {
    const courseId = await newCourse('Capped course');
    // The course has already sent cap − 1 mails today (written directly: sending hundreds of
    // real mails would slow every other test reading maildev).
    const filler = Array.from({ length: cap - 1 }, (_, i) => ({
      courseId,
      kind: 'invitation' as const,
      email: `filler-${i}@tests.parley.test`,
      sentBy: instructorId,
    }));
    for (let i = 0; i < filler.length; i += 200)
      await testDb()
        .insert(courseMails)
        .values(filler.slice(i, i + 200));

    const last = uniqueEmail('cap-last');
    expect((await invite(courseId, last)).status).toBe(200);
    await waitForMail(last, { subject: /Invitation to/ });

    const over = uniqueEmail('cap-over');
    const refused = await invite(courseId, over);
    expect(refused.status).toBe(429);
    expect(pageText(await refused.text())).toContain(`at most ${cap} invitation e-mails a day`);
    expect(await pendingOf(courseId, over)).toHaveLength(0);

    // a roster import past the cap still adds the people but mails nobody, and says so
    const student = uniqueEmail('cap-student');
    const roster = await instructor.post(`/courses/${courseId}/roster`, {
      intent: 'import',
      fileName: 'r.csv',
      csv: `email,name,student id\n${student},Cap Student,C-1\n`,
    });
    expect(roster.status).toBe(200);
    expect(pageText(await roster.text())).toContain(`1 person was not e-mailed: this course has sent its ${cap} e-mails for today`);

    await new Promise((r) => setTimeout(r, 1500));
    expect(await mailTo(over)).toHaveLength(0);
    expect(await mailTo(student)).toHaveLength(0);
  });
});

describe('an invitation whose mail fails', () => {
  const faults = process.env.PARLEY_TEST_MAIL_FAULTS;

  it('is shown as not sent with a Resend button, and Resend sends a working link', async () => {
    expect(faults, 'scripts/test.mjs sets PARLEY_TEST_MAIL_FAULTS').toBeTruthy();
    const courseId = await newCourse('Unsent course');
    const to = uniqueEmail('unsent');
    fs.appendFileSync(faults!, `${to}\n`);
    let res: Response;
    try {
      res = await invite(courseId, to);
    } finally {
      fs.writeFileSync(
        faults!,
        fs
          .readFileSync(faults!, 'utf8')
          .split('\n')
          .filter((l) => l.trim() !== to)
          .join('\n'),
      );
    }
    expect(res.status).toBe(503);
    const said = pageText(await res.text());
    expect(said).toContain('We could not send the e-mail');
    expect(said).not.toMatch(/127\.0\.0\.1|ECONNREFUSED|smtp/i);
    const [stored] = await pendingOf(courseId, to);
    expect(stored.sentAt).toBeNull();

    const page = pageText(await (await instructor.get(`/courses/${courseId}/members`)).text());
    expect(page).toContain(`${to} · Assistant · not sent`);
    expect(page).toContain(`Resend invitation to ${to}`);
    // assistants see the list but may not resend
    expect(pageText(await (await assistant.get(`/courses/${courseId}/members`)).text())).not.toContain(`Resend invitation to ${to}`);
    expect((await assistant.post(`/courses/${courseId}/members`, { intent: 'resend', invitationId: stored.id })).status).toBe(403);

    const resent = await instructor.post(`/courses/${courseId}/members`, { intent: 'resend', invitationId: stored.id });
    expect(resent.status).toBe(200);
    const mail = await waitForMail(to, { subject: /Invitation to/ });
    const [after] = await pendingOf(courseId, to);
    expect(after.sentAt).not.toBeNull();
    expect(pageText(await (await instructor.get(`/courses/${courseId}/members`)).text())).not.toContain(`${to} · Assistant · not sent`);

    const link = new URL(/(http\S+\/invitations\/\S+)/.exec(mail.text)![1]).pathname;
    const guest = await signIn(to);
    expect(await (await guest.get(link)).text()).toContain('Accept and join');
  });
});
