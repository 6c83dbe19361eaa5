/**
 * The summary e-mail each participant can receive after a session (product.md, "E-mail"): their
 * supergames, points and credit. One `result_mails` row per recipient holds its status; a job per
 * session (app/jobs) sends the queued ones at a bounded rate (RESULT_MAILS_PER_MINUTE) and records
 * failures, which the instructor can queue again.
 */
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import { z } from 'zod';
import { defineJob, enqueue } from '#app/jobs/queue.server';
import { creditFor, describeCreditRule, formatCredit } from '#app/lib/credit';
import { db } from '#app/utils/db.server';
import { env } from '#app/utils/env.server';
import { escapeHtml, htmlFrame, type Mail, sendMail } from '#app/utils/mail.server';
import { courseMembers, courses, resultMails, sessionParticipants, sessions, users } from '#drizzle/schema';
import { memberName } from './course.server';
import { type PanelSession, type PanelRow, panelPages, panelSessions } from './panel-export.server';

export interface SupergameLine {
  supergame: number;
  partners: string[];
  /** rounds that count (L) and that the participant played */
  rounds: number;
  points: number;
  /** rounds that count that a computer played in the seat after a hand-over */
  byComputer: number;
}

/** One participant's supergames from their panel rows (rounds after L under block termination do not count). */
export function summarise(rows: readonly PanelRow[]): { supergames: SupergameLine[]; points: number } {
  const bySupergame = new Map<number, SupergameLine>();
  for (const r of rows) {
    let line = bySupergame.get(r.supergame);
    if (!line) bySupergame.set(r.supergame, (line = { supergame: r.supergame, partners: [], rounds: 0, points: 0, byComputer: 0 }));
    // partners stay anonymous: another participant, or a disclosed computer partner
    const partner = r.partner.startsWith('computer:') ? r.partner : 'participant';
    if (!line.partners.includes(partner)) line.partners.push(partner);
    if (r.supergame_length !== null && r.round > r.supergame_length) continue;
    // after a hand-over the computer's rounds are not the participant's (decision 030)
    if (r.origin === 'computer_seat') {
      line.byComputer += 1;
      continue;
    }
    line.rounds += 1;
    line.points += r.payoff;
  }
  const supergames = [...bySupergame.values()].sort((a, b) => a.supergame - b.supergame);
  const points = Math.round(supergames.reduce((s, l) => s + l.points, 0) * 1e4) / 1e4;
  return { supergames, points };
}

const partnerWords = (p: string) =>
  p.startsWith('computer:') ? `a computer partner (${p.slice('computer:'.length)})` : 'another participant';
const computerWords = (s: SupergameLine) =>
  s.byComputer
    ? ` (then a computer played ${s.byComputer} round${s.byComputer === 1 ? '' : 's'} in your seat; they earn you no points)`
    : '';

export function resultMail(opts: {
  to: string;
  name: string | null;
  course: string;
  session: PanelSession;
  pseudonym: string;
  rows: PanelRow[];
}): Mail {
  const { supergames, points } = summarise(opts.rows);
  const credit = formatCredit(creditFor(opts.session.credit, points));
  const rule = describeCreditRule(opts.session.credit);
  const hello = opts.name ? `Hello ${opts.name},` : 'Hello,';
  const lines = supergames.map(
    (s) =>
      `Supergame ${s.supergame}: with ${s.partners.map(partnerWords).join(', then ')}, ${s.rounds} round${s.rounds === 1 ? '' : 's'}, ${s.points} points${computerWords(s)}`,
  );
  const title = `Your results: ${opts.course}`;
  return {
    to: opts.to,
    subject: `Your results from session ${opts.session.id} of ${opts.course}`,
    text: [
      hello,
      '',
      `here is your summary of session ${opts.session.id} (${opts.session.treatment}). You played as ${opts.pseudonym}.`,
      '',
      ...lines,
      '',
      `Points: ${points}`,
      `Credit: ${credit} (${rule})`,
      '',
      opts.session.simulated ? 'This session is part of Parley’s demo: its choices are simulated.' : 'Thank you for taking part.',
    ].join('\n'),
    html: htmlFrame(
      title,
      `<p style="font-size:16px">${escapeHtml(hello)} here is your summary of session ${opts.session.id} (${escapeHtml(opts.session.treatment)}). You played as <strong>${escapeHtml(opts.pseudonym)}</strong>.</p>
<table style="border-collapse:collapse;font-size:15px;width:100%"><thead><tr><th style="text-align:left;padding:4px">Supergame</th><th style="text-align:left;padding:4px">Partner</th><th style="text-align:right;padding:4px">Rounds</th><th style="text-align:right;padding:4px">Points</th></tr></thead><tbody>
${supergames
  .map(
    (s) =>
      `<tr><td style="padding:4px">${s.supergame}</td><td style="padding:4px">${escapeHtml(s.partners.map(partnerWords).join(', then '))}</td><td style="text-align:right;padding:4px">${s.rounds}${s.byComputer ? escapeHtml(computerWords(s)) : ''}</td><td style="text-align:right;padding:4px">${s.points}</td></tr>`,
  )
  .join('\n')}
</tbody></table>
<p style="font-size:16px"><strong>Points: ${points}</strong><br><strong>Credit: ${escapeHtml(credit)}</strong> <span style="color:#475569">(${escapeHtml(rule)})</span></p>
<p style="color:#475569;font-size:14px">${opts.session.simulated ? 'This session is part of Parley’s demo: its choices are simulated.' : 'Thank you for taking part.'}</p>`,
    ),
  };
}

/** Queues a mail for every participant who has none yet (a sent one is never sent twice). */
export async function queueResultMails(sessionId: number): Promise<number> {
  const people = await db()
    .select({ userId: sessionParticipants.userId })
    .from(sessionParticipants)
    .where(eq(sessionParticipants.sessionId, sessionId));
  if (people.length === 0) return 0;
  const [res] = await db()
    .insert(resultMails)
    .values(people.map((p) => ({ sessionId, userId: p.userId })))
    .onDuplicateKeyUpdate({ set: { sessionId: sql`session_id` } });
  // affectedRows counts 1 per insert and 0 per untouched duplicate
  return res.affectedRows;
}

export async function retryFailedMails(sessionId: number): Promise<number> {
  const [res] = await db()
    .update(resultMails)
    .set({ status: 'queued', error: null })
    .where(and(eq(resultMails.sessionId, sessionId), eq(resultMails.status, 'failed')));
  return res.affectedRows;
}

export async function resultMailStatus(sessionId: number) {
  const rows = await db()
    .select({
      id: resultMails.id,
      email: users.email,
      name: memberName,
      pseudonym: sessionParticipants.pseudonym,
      status: resultMails.status,
      attempts: resultMails.attempts,
      error: resultMails.error,
      sentAt: resultMails.sentAt,
    })
    .from(resultMails)
    .innerJoin(users, eq(users.id, resultMails.userId))
    .leftJoin(
      sessionParticipants,
      and(eq(sessionParticipants.sessionId, resultMails.sessionId), eq(sessionParticipants.userId, resultMails.userId)),
    )
    .innerJoin(sessions, eq(sessions.id, resultMails.sessionId))
    .leftJoin(courseMembers, and(eq(courseMembers.userId, resultMails.userId), eq(courseMembers.courseId, sessions.courseId)))
    .where(eq(resultMails.sessionId, sessionId))
    .orderBy(asc(sessionParticipants.seq));
  const counts = { queued: 0, sending: 0, sent: 0, failed: 0 };
  for (const r of rows) counts[r.status] += 1;
  return { rows, counts, busy: counts.queued + counts.sending > 0 };
}

export interface DrainOptions {
  send?: (mail: Mail) => Promise<void>;
  /** pause between two mails */
  intervalMs?: number;
}

/**
 * Sends a session's queued mails one by one until none is left. A row is claimed by a guarded
 * update (queued → sending), so two loops never send the same mail.
 */
export async function drainResultMails(session: PanelSession, opts: DrainOptions = {}): Promise<void> {
  const send = opts.send ?? sendMail;
  const intervalMs = opts.intervalMs ?? Math.ceil(60_000 / env().RESULT_MAILS_PER_MINUTE);
  const [course] = await db().select({ title: courses.title }).from(courses).where(eq(courses.id, session.courseId));
  for (;;) {
    const [next] = await db()
      .select({ id: resultMails.id, userId: resultMails.userId })
      .from(resultMails)
      .where(and(eq(resultMails.sessionId, session.id), eq(resultMails.status, 'queued')))
      .orderBy(asc(resultMails.id))
      .limit(1);
    if (!next) return;
    const [claim] = await db()
      .update(resultMails)
      .set({ status: 'sending', attempts: sql`${resultMails.attempts} + 1` })
      .where(and(eq(resultMails.id, next.id), eq(resultMails.status, 'queued')));
    if (claim.affectedRows !== 1) continue;
    try {
      const [who] = await db()
        .select({ email: users.email, name: memberName, key: sessionParticipants.participantKey, pseudonym: sessionParticipants.pseudonym })
        .from(users)
        .innerJoin(sessionParticipants, and(eq(sessionParticipants.userId, users.id), eq(sessionParticipants.sessionId, session.id)))
        .leftJoin(courseMembers, and(eq(courseMembers.userId, users.id), eq(courseMembers.courseId, session.courseId)))
        .where(eq(users.id, next.userId));
      if (!who) throw new Error('not a participant of this session');
      const rows: PanelRow[] = [];
      for await (const page of panelPages([session], { identified: true, participantKeys: [who.key] })) rows.push(...page.rows);
      await send(
        resultMail({ to: who.email, name: who.name, course: course?.title ?? 'your course', session, pseudonym: who.pseudonym, rows }),
      );
      await db().update(resultMails).set({ status: 'sent', sentAt: new Date(), error: null }).where(eq(resultMails.id, next.id));
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      await db()
        .update(resultMails)
        .set({ status: 'failed', error: message.slice(0, 500) })
        .where(eq(resultMails.id, next.id));
    }
    await new Promise((r) => setTimeout(r, intervalMs));
  }
}

// One job per session sends its queued mails; asked again while it runs, it makes one more pass,
// so mails queued while it was finishing are not left behind.
export const resultMailsJob = defineJob({
  kind: 'result-mails',
  payload: z.object({ sessionId: z.number().int().positive() }),
  concurrency: 4,
  run: async ({ sessionId }) => {
    const [s] = await db().select({ courseId: sessions.courseId }).from(sessions).where(eq(sessions.id, sessionId));
    const [session] = s ? await panelSessions(s.courseId, [sessionId]) : [];
    if (!session) return;
    // A mail left "sending" by a run whose process stopped was never confirmed: send it again.
    await db()
      .update(resultMails)
      .set({ status: 'queued' })
      .where(and(eq(resultMails.sessionId, sessionId), eq(resultMails.status, 'sending')));
    await drainResultMails(session);
  },
  recover: () => resumeResultMails(),
});

/** Sends the session's queued results e-mails in the background (after queueing or a retry). */
export async function sendQueuedResultMails(session: { id: number; courseId: number }): Promise<void> {
  await enqueue(resultMailsJob, { sessionId: session.id }, { courseId: session.courseId, key: `result-mails:${session.id}`, again: true });
}

/** After a restart: carry on sending every session's queued (or unconfirmed) results e-mails. */
export async function resumeResultMails(): Promise<number> {
  const pending = await db()
    .selectDistinct({ id: resultMails.sessionId, courseId: sessions.courseId })
    .from(resultMails)
    .innerJoin(sessions, eq(sessions.id, resultMails.sessionId))
    .where(inArray(resultMails.status, ['queued', 'sending']));
  for (const session of pending) await sendQueuedResultMails(session);
  return pending.length;
}
