/**
 * Roster import: validated roster rows (app/lib/roster-csv.ts) checked against the course, then
 * written all-or-nothing in one transaction. People on the roster become participants of the
 * course directly and are told so by e-mail (docs/decisions/020-roster-adds-participants.md).
 * Importing the same file again changes nothing and sends nothing.
 */
import { and, eq, inArray } from 'drizzle-orm';
import type { RosterIssue, RosterRow } from '#app/lib/roster-csv';
import { db } from '#app/utils/db.server';
import { env } from '#app/utils/env.server';
import { escapeHtml, htmlFrame, type Mail, senderOf } from '#app/utils/mail.server';
import { ROLE_WORDS } from '#app/utils/format';
import { courseMembers, users } from '#drizzle/schema';

export type RosterStatus = 'new' | 'unchanged' | 'student-id-changes';

export interface PlannedRow extends RosterRow {
  status: RosterStatus;
  /** the name this course already has for this person, kept when it differs from the file's */
  knownName: string | null;
}

export interface RosterPlan {
  rows: PlannedRow[];
  errors: RosterIssue[];
}

type Reader = Pick<ReturnType<typeof db>, 'select'>;

/** What importing the rows would do, and the lines that clash with the course as it is. */
export async function planRoster(courseId: number, rows: readonly RosterRow[], reader: Reader = db()): Promise<RosterPlan> {
  const errors: RosterIssue[] = [];
  const planned: PlannedRow[] = [];
  if (rows.length === 0) return { rows: planned, errors };
  const emails = rows.map((r) => r.email);
  const known = await reader.select({ id: users.id, email: users.email }).from(users).where(inArray(users.email, emails));
  const userByEmail = new Map(known.map((u) => [u.email.toLowerCase(), u]));
  const members = await reader
    .select({
      userId: courseMembers.userId,
      role: courseMembers.role,
      studentId: courseMembers.studentId,
      email: users.email,
      name: courseMembers.name,
    })
    .from(courseMembers)
    .innerJoin(users, eq(users.id, courseMembers.userId))
    .where(eq(courseMembers.courseId, courseId));
  const memberByUser = new Map(members.map((m) => [m.userId, m]));
  const holderOfId = new Map(members.filter((m) => m.studentId).map((m) => [m.studentId!, m]));

  for (const r of rows) {
    const user = userByEmail.get(r.email);
    const member = user ? memberByUser.get(user.id) : undefined;
    if (member && member.role !== 'participant') {
      errors.push({
        line: r.line,
        message: `${r.email} is already in this course as ${ROLE_WORDS[member.role].toLowerCase()}; a roster adds participants only`,
      });
      continue;
    }
    const holder = holderOfId.get(r.studentId);
    if (holder && holder.email.toLowerCase() !== r.email) {
      errors.push({ line: r.line, message: `student id ${r.studentId} already belongs to ${holder.email} in this course` });
      continue;
    }
    // Names are the course's own (course_members.name): another course's roster never shows here.
    const knownName = member?.name && member.name !== r.name ? member.name : null;
    const status: RosterStatus = !member ? 'new' : member.studentId === r.studentId ? 'unchanged' : 'student-id-changes';
    planned.push({ ...r, status, knownName });
  }
  return { rows: planned, errors };
}

export interface ImportResult {
  added: RosterRow[];
  changed: number;
  unchanged: number;
}

/**
 * Writes the roster in one transaction, checking it again inside (someone may have changed the
 * course since the preview). Any clash → nothing written, the clashes returned.
 */
export async function importRoster(
  courseId: number,
  rows: readonly RosterRow[],
): Promise<{ ok: true; result: ImportResult } | { ok: false; errors: RosterIssue[] }> {
  class Clash extends Error {
    constructor(readonly errors: RosterIssue[]) {
      super('roster clashes');
    }
  }
  try {
    const result = await db().transaction(async (tx) => {
      // Lock the course's membership rows so two imports do not interleave.
      await tx.select({ id: courseMembers.id }).from(courseMembers).where(eq(courseMembers.courseId, courseId)).for('update');
      const plan = await planRoster(courseId, rows, tx);
      if (plan.errors.length) throw new Clash(plan.errors);
      const added: RosterRow[] = [];
      let changed = 0;
      let unchanged = 0;
      for (const r of plan.rows) {
        if (r.status === 'unchanged') {
          unchanged += 1;
          continue;
        }
        // The account gets no name from a roster: users.name is shared by every course.
        await tx
          .insert(users)
          .values({ email: r.email })
          .onDuplicateKeyUpdate({ set: { email: r.email } });
        const [u] = await tx.select({ id: users.id }).from(users).where(eq(users.email, r.email));
        if (r.status === 'new') {
          await tx.insert(courseMembers).values({ courseId, userId: u.id, role: 'participant', studentId: r.studentId, name: r.name });
          added.push(r);
        } else {
          await tx
            .update(courseMembers)
            .set({ studentId: r.studentId, name: r.knownName ?? r.name })
            .where(and(eq(courseMembers.courseId, courseId), eq(courseMembers.userId, u.id)));
          changed += 1;
        }
      }
      return { added, changed, unchanged };
    });
    return { ok: true, result };
  } catch (error) {
    if (error instanceof Clash) return { ok: false, errors: error.errors };
    throw error;
  }
}

/** "You are on the roster": how a participant added by an import hears about it. */
export function rosterMail(opts: {
  to: string;
  name: string;
  courseTitle: string;
  instructor: { name: string | null; email: string };
}): Mail {
  const link = new URL('/sign-in', env().APP_URL).toString();
  const instructor = senderOf(opts.instructor);
  return {
    to: opts.to,
    subject: `You are on the roster of ${opts.courseTitle} on Parley, added by ${opts.instructor.email}`,
    text: [
      `Hello ${opts.name},`,
      '',
      `${instructor} added you as a participant of “${opts.courseTitle}” on Parley, where the class runs its experiments on phones.`,
      '',
      'There is nothing to do now. In class you will type a join code and sign in with a code e-mailed to this address (no app, no password).',
      `You can sign in beforehand here: ${link}`,
      '',
      'If you think this is a mistake, reply to your instructor.',
    ].join('\n'),
    html: htmlFrame(
      `You are on the roster of ${opts.courseTitle}`,
      `<p style="font-size:16px">Hello ${escapeHtml(opts.name)},</p>
<p style="font-size:16px">${escapeHtml(instructor)} added you as a participant of <strong>${escapeHtml(opts.courseTitle)}</strong> on Parley, where the class runs its experiments on phones.</p>
<p style="font-size:16px">There is nothing to do now. In class you will type a join code and sign in with a code e-mailed to this address (no app, no password).</p>
<p><a href="${escapeHtml(link)}" style="display:inline-block;background:#0e5357;color:#fff;padding:12px 20px;border-radius:8px;text-decoration:none;font-weight:600">Sign in to Parley</a></p>
<p style="color:#475569;font-size:14px">If you think this is a mistake, reply to your instructor.</p>`,
    ),
  };
}
