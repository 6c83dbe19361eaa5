import { asc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { panelSessions } from '#app/models/panel-export.server';
import { drainResultMails, resumeResultMails } from '#app/models/result-mails.server';
import { closeDb } from '#app/utils/db.server';
import { sendMail } from '#app/utils/mail.server';
import { resultMails, sessionParticipants } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';
import { mailTo, waitForMail } from '#tests/helpers/mail';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

interface Status {
  rows: { email: string; status: string; attempts: number; error: string | null }[];
  counts: Record<'queued' | 'sending' | 'sent' | 'failed', number>;
  busy: boolean;
}

let instructor: Client;
let researcher: Client;
let courseId: number;
let a: Awaited<ReturnType<typeof insertSyntheticSession>>;
let b: Awaited<ReturnType<typeof insertSyntheticSession>>;

const url = (sessionId: number) => `/courses/${courseId}/sessions/${sessionId}/result-mails`;

async function statusOf(sessionId: number): Promise<Status> {
  const res = await instructor.get(url(sessionId));
  expect(res.status).toBe(200);
  return (await res.json()) as Status;
}

async function settled(sessionId: number): Promise<Status> {
  const until = Date.now() + 20_000;
  for (;;) {
    const s = await statusOf(sessionId);
    if (!s.busy) return s;
    if (Date.now() > until) throw new Error(`mails still on their way: ${JSON.stringify(s.counts)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

beforeAll(async () => {
  const instructorEmail = uniqueEmail('instr');
  const researcherEmail = uniqueEmail('res');
  const i = await createUser(instructorEmail, 'Mail Instructor');
  const r = await createUser(researcherEmail);
  courseId = await createCourse(`Mail course ${Date.now().toString(36)}`, [
    { userId: i, role: 'instructor' },
    { userId: r, role: 'researcher' },
  ]);
  a = await insertSyntheticSession(testDb(), {
    courseId,
    createdBy: i,
    participants: 3,
    lengths: [2, 1, 3],
    seed: 31,
    tag: `mail-a-${Date.now().toString(36)}`,
  });
  b = await insertSyntheticSession(testDb(), {
    courseId,
    createdBy: i,
    participants: 3,
    lengths: [1, 2],
    seed: 32,
    tag: `mail-b-${Date.now().toString(36)}`,
  });
  [instructor, researcher] = await Promise.all([signIn(instructorEmail), signIn(researcherEmail)]);
});

afterAll(async () => {
  await a?.remove();
  await b?.remove();
  await closeTestDb();
  await closeDb();
});

describe('results e-mails', () => {
  it('are the instructor’s to send', async () => {
    expect((await researcher.get(`/courses/${courseId}/sessions/${a.sessionId}/results`)).status).toBe(403);
    expect((await researcher.post(url(a.sessionId), { intent: 'send' })).status).toBe(403);
    expect((await instructor.post(url(a.sessionId), { intent: 'shout' })).status).toBe(400);
    expect((await instructor.get(`/courses/${courseId}/sessions/${a.sessionId}/results`)).status).toBe(200);
  });

  it('go out in the background at a bounded rate, one status per recipient, each with their supergames, points and credit', async () => {
    const res = await instructor.post(url(a.sessionId), { intent: 'send' });
    expect(res.status).toBe(200);
    const done = await settled(a.sessionId);
    expect(done.counts).toEqual({ queued: 0, sending: 0, sent: 3, failed: 0 });
    const rows = await testDb().select().from(resultMails).where(eq(resultMails.sessionId, a.sessionId)).orderBy(asc(resultMails.sentAt));
    // RESULT_MAILS_PER_MINUTE (300 by default) spaces them by about 200 ms
    for (let k = 1; k < rows.length; k++) expect(rows[k].sentAt!.getTime() - rows[k - 1].sentAt!.getTime()).toBeGreaterThanOrEqual(150);

    const panel = (await (await instructor.get(`/courses/${courseId}/data/panel?session=${a.sessionId}&format=json`)).json()) as {
      pseudonym: string;
      payoff: number;
    }[];
    for (const [k, email] of a.emails.entries()) {
      const mail = await waitForMail(email, { subject: new RegExp(`Your results from session ${a.sessionId}`) });
      const pseudonym = `P-${String(k + 1).padStart(3, '0')}`;
      const points = panel.filter((r) => r.pseudonym === pseudonym).reduce((s, r) => s + r.payoff, 0);
      expect(mail.text).toContain(`You played as ${pseudonym}.`);
      expect(mail.text).toContain(`Points: ${points}`);
      expect(mail.text).toMatch(/Supergame 1: with .+, 2 rounds, \d+ points/);
      expect(mail.text).toMatch(/Supergame 3: with .+, 3 rounds, \d+ points/);
      expect(mail.text).toContain('Credit: 1 (1 credit for taking part)');
    }
    // sending again mails nobody twice
    await instructor.post(url(a.sessionId), { intent: 'send' });
    expect((await settled(a.sessionId)).counts.sent).toBe(3);
    for (const email of a.emails)
      expect((await mailTo(email)).filter((m) => m.subject.includes(`session ${a.sessionId} `))).toHaveLength(1);
  });

  it('show failures, and a retry sends them', async () => {
    // queued here and sent by a loop in this process whose mail server refuses one address
    await testDb()
      .insert(resultMails)
      .values(b.userIds.map((userId) => ({ sessionId: b.sessionId, userId })));
    const [session] = await panelSessions(courseId, [b.sessionId]);
    await drainResultMails(session, {
      intervalMs: 0,
      send: async (mail) => {
        if (mail.to === b.emails[1]) throw new Error('550 mailbox unavailable');
        await sendMail(mail);
      },
    });
    const failed = await statusOf(b.sessionId);
    expect(failed.counts).toEqual({ queued: 0, sending: 0, sent: 2, failed: 1 });
    expect(failed.rows.find((r) => r.email === b.emails[1])).toMatchObject({
      status: 'failed',
      attempts: 1,
      error: '550 mailbox unavailable',
    });
    const page = pageText(await (await instructor.get(`/courses/${courseId}/sessions/${b.sessionId}/results`)).text());
    expect(page).toContain('Retry 1 failed');
    expect(page).toContain('550 mailbox unavailable');

    expect((await instructor.post(url(b.sessionId), { intent: 'retry' })).status).toBe(200);
    const retried = await settled(b.sessionId);
    expect(retried.counts).toEqual({ queued: 0, sending: 0, sent: 3, failed: 0 });
    expect(retried.rows.find((r) => r.email === b.emails[1])).toMatchObject({ status: 'sent', attempts: 2, error: null });
    await waitForMail(b.emails[1], { subject: new RegExp(`Your results from session ${b.sessionId}`) });
  });

  it('mails queued when the server stopped are sent after a restart', async () => {
    // As a stopped process leaves them: one queued, one claimed but never confirmed.
    const existing = await testDb().select().from(resultMails).where(eq(resultMails.sessionId, b.sessionId));
    if (existing.length === 0) {
      const ps = await testDb().select().from(sessionParticipants).where(eq(sessionParticipants.sessionId, b.sessionId));
      await testDb()
        .insert(resultMails)
        .values(
          ps
            .slice(0, 2)
            .map((p, k) => ({ sessionId: b.sessionId, userId: p.userId, status: k === 0 ? ('queued' as const) : ('sending' as const) })),
        );
    } else {
      await testDb().update(resultMails).set({ status: 'queued' }).where(eq(resultMails.sessionId, b.sessionId));
    }
    expect(await resumeResultMails()).toBeGreaterThanOrEqual(1);
    const done = await settled(b.sessionId);
    expect(done.counts.queued + done.counts.sending).toBe(0);
    expect(done.counts.sent).toBeGreaterThanOrEqual(2);
  });
});
