import fs from 'node:fs';
import path from 'node:path';
import { and, asc, eq, like } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROSTER_LIMITS } from '#app/lib/roster-csv';
import { courseMembers, users } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';
import { mailTo, waitForMail } from '#tests/helpers/mail';

const fixture = (name: string) => fs.readFileSync(path.join('tests/fixtures/roster', name));

function upload(client: Client, courseId: number, name: string, bytes: Buffer | string) {
  const form = new FormData();
  form.set('intent', 'preview');
  form.set('file', new File([typeof bytes === 'string' ? bytes : new Uint8Array(bytes)], name, { type: 'text/csv' }));
  return client.postForm(`/courses/${courseId}/roster`, form);
}

function importCsv(client: Client, courseId: number, csv: string) {
  return client.post(`/courses/${courseId}/roster`, { intent: 'import', fileName: 'roster.csv', csv });
}

const membersOf = (courseId: number) =>
  testDb()
    .select({
      id: courseMembers.id,
      userId: courseMembers.userId,
      role: courseMembers.role,
      studentId: courseMembers.studentId,
      createdAt: courseMembers.createdAt,
    })
    .from(courseMembers)
    .where(eq(courseMembers.courseId, courseId))
    .orderBy(asc(courseMembers.id));

const rosterUsers = () =>
  testDb()
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .where(like(users.email, '%@roster.parley.test'))
    .orderBy(asc(users.id));

let instructor: Client;
let assistant: Client;
let courseId: number;
let courseTitle: string;
let assistantEmail: string;

beforeAll(async () => {
  const instructorEmail = uniqueEmail('instr');
  assistantEmail = uniqueEmail('ta');
  const i = await createUser(instructorEmail, 'Roster Instructor');
  const a = await createUser(assistantEmail);
  courseTitle = `Roster course ${Date.now().toString(36)}`;
  courseId = await createCourse(courseTitle, [
    { userId: i, role: 'instructor' },
    { userId: a, role: 'assistant' },
  ]);
  [instructor, assistant] = await Promise.all([signIn(instructorEmail), signIn(assistantEmail)]);
});

afterAll(async () => {
  await closeTestDb();
});

describe('roster upload', () => {
  it('shows every bad line with its problem and writes nothing, at preview and at import', async () => {
    const membersBefore = await membersOf(courseId);
    const usersBefore = await rosterUsers();
    const res = await upload(instructor, courseId, 'bad-lines.csv', fixture('bad-lines.csv'));
    expect(res.status).toBe(400);
    const text = pageText(await res.text());
    expect(text).toContain('8 problems in bad-lines.csv: nothing was written');
    for (const line of [
      'Line 3: bad e-mail "not-an-email": is not an e-mail address',
      'Line 4: duplicate e-mail hugo.marsh@roster.parley.test (first on line 2)',
      'Line 5: missing column "student id" (the line has 2 of 3 fields)',
      'Line 6: name is empty',
      'Line 7: duplicate student id RS-4001 (first on line 2)',
      'Line 8: e-mail is empty',
      'Line 11: bad e-mail "maria@@roster.parley.test": is not an e-mail address',
      'Line 12: student id is empty',
    ]) {
      expect(text).toContain(line);
    }
    // posting the bad file straight to the import (skipping the preview) writes nothing either
    expect((await importCsv(instructor, courseId, fixture('bad-lines.csv').toString('utf8'))).status).toBe(400);
    for (const name of ['missing-column.csv', 'empty.csv', 'header-only.csv', 'not-utf8.csv']) {
      expect((await upload(instructor, courseId, name, fixture(name))).status).toBe(400);
    }
    expect(await membersOf(courseId)).toEqual(membersBefore);
    expect(await rosterUsers()).toEqual(usersBefore);
  });

  it('a clash with the course (a staff member’s e-mail) blocks the whole file', async () => {
    const csv = `email,name,student id\nzora.penn@roster.parley.test,Zora Penn,RS-6001\n${assistantEmail},Some Assistant,RS-6002\n`;
    const res = await upload(instructor, courseId, 'clash.csv', csv);
    expect(res.status).toBe(400);
    expect(pageText(await res.text())).toContain(
      `Line 3: ${assistantEmail} is already in this course as assistant; a roster adds participants only`,
    );
    expect((await importCsv(instructor, courseId, csv)).status).toBe(400);
    expect((await rosterUsers()).map((u) => u.email)).not.toContain('zora.penn@roster.parley.test');
  });

  it('previews a good file without writing, imports it once, e-mails the new participants, and a second import changes nothing', async () => {
    const before = await membersOf(courseId);
    const preview = await upload(instructor, courseId, 'good.csv', fixture('good.csv'));
    expect(preview.status).toBe(200);
    const text = pageText(await preview.text());
    expect(text).toContain('4 valid lines: 4 new, 0 student id changes, 0 already on the roster');
    expect(text).toContain('Quill, Tomas');
    expect(await membersOf(courseId)).toEqual(before);

    const csv = fixture('good.csv').toString('utf8');
    const first = await importCsv(instructor, courseId, csv);
    expect(first.status).toBe(200);
    expect(pageText(await first.text())).toContain('4 new participants added and e-mailed, 0 student ids changed, 0 already on the roster');
    const after = await membersOf(courseId);
    const added = await testDb()
      .select({ email: users.email, name: courseMembers.name, studentId: courseMembers.studentId, role: courseMembers.role })
      .from(courseMembers)
      .innerJoin(users, eq(users.id, courseMembers.userId))
      .where(and(eq(courseMembers.courseId, courseId), eq(courseMembers.role, 'participant')))
      .orderBy(asc(courseMembers.studentId));
    expect(added).toEqual([
      { email: 'ines.vardy@roster.parley.test', name: 'Ines Vardy', studentId: 'RS-2001', role: 'participant' },
      { email: 'tomas.quill@roster.parley.test', name: 'Quill, Tomas', studentId: 'RS-2002', role: 'participant' },
      { email: 'kaia.brenner@roster.parley.test', name: 'Kaia Brenner', studentId: 'RS-2003', role: 'participant' },
      { email: 'otto.lind@roster.parley.test', name: 'Otto Lind', studentId: 'RS-2004', role: 'participant' },
    ]);
    const subject = new RegExp(`You are on the roster of ${courseTitle}`);
    for (const a of added) {
      const mail = await waitForMail(a.email, { subject });
      expect(mail.text).toContain('join code');
    }

    // the same file again: everything "already on the roster", nothing written, nobody mailed
    const again = await upload(instructor, courseId, 'good.csv', fixture('good.csv'));
    expect(pageText(await again.text())).toContain('4 valid lines: 0 new, 0 student id changes, 4 already on the roster');
    const second = await importCsv(instructor, courseId, csv);
    expect(second.status).toBe(200);
    expect(pageText(await second.text())).toContain(
      '0 new participants added and e-mailed, 0 student ids changed, 4 already on the roster',
    );
    expect(await membersOf(courseId)).toEqual(after);
    for (const a of added) expect((await mailTo(a.email)).filter((m) => subject.test(m.subject))).toHaveLength(1);
  });

  it('is the instructor’s alone, and refuses an oversized file with a clear message', async () => {
    expect((await assistant.get(`/courses/${courseId}/roster`)).status).toBe(403);
    expect((await upload(assistant, courseId, 'good.csv', fixture('good.csv'))).status).toBe(403);
    const big = 'email,name,student id\n' + 'x'.repeat(ROSTER_LIMITS.maxBytes);
    const res = await upload(instructor, courseId, 'huge.csv', big);
    expect(res.status).toBe(413);
    expect(pageText(await res.text())).toContain(`The file is larger than ${ROSTER_LIMITS.maxBytes / 1024} KB`);
  });
});
