// The steps a phone takes from the join code to the lobby (issue 12): the instructions and consent
// (routes/play/join-code.tsx), the comprehension check (join-check.tsx) and the practice supergame
// (join-practice.tsx), when the design asks for them. Each step checks admission again and sends
// a phone that is already in the session to its game.
import { eq } from 'drizzle-orm';
import { redirect } from 'react-router';
import { z } from 'zod';
import type { Design } from '#app/lib/design';
import { hasPassed } from '#app/models/comprehension.server';
import { getSession, participantKeyOf } from '#app/models/live.server';
import { findByJoinCode, setConsent } from '#app/models/session.server';
import { type CurrentUser } from '#app/utils/auth.server';
import { db } from '#app/utils/db.server';
import { respondUnless } from '#app/utils/http.server';
import { roleIn } from '#app/utils/permissions.server';
import { runner } from '#app/utils/runner.server';
import { courses, sessions, users } from '#drizzle/schema';

/** Who may join: roster sessions admit course members; open ones anyone (by e-mail domain if set). */
export async function admission(code: string, user: CurrentUser) {
  const found = await findByJoinCode(code);
  respondUnless(found, 404, 'There is no session with this code. Check the code on the big screen.');
  const session = (await getSession(found.id))!;
  if (found.status === 'complete') return { session, refusal: 'This session has ended.' };
  if (found.admission === 'roster' && !(await roleIn(found.courseId, user.id))) {
    return { session, refusal: 'This session admits the members of its course only. Ask your instructor for an invitation to the course.' };
  }
  if (found.admission === 'open' && found.emailDomain && !user.email.endsWith(`@${found.emailDomain}`)) {
    return { session, refusal: `This session admits e-mail addresses ending in @${found.emailDomain}. Sign in with that address.` };
  }
  return { session, refusal: null };
}

export type JoinSession = Awaited<ReturnType<typeof admission>>['session'];

/** Already in the session (a reload, a second tab) and still admitted: straight to the game. */
export async function sendJoinedToPlay(session: JoinSession, user: CurrentUser, refusal: string | null = null) {
  const state = await runner().state(session.id);
  if (!refusal && state?.participants[participantKeyOf(user.id)]) throw redirect(`/play/${session.id}`);
  return state;
}

/** The course, and the instructor who opened the session, as the instructions page names them. */
export async function sessionHeading(sessionId: number) {
  const [row] = await db()
    .select({ course: courses.title, institution: courses.institution, instructor: users.name })
    .from(sessions)
    .innerJoin(courses, eq(courses.id, sessions.courseId))
    .innerJoin(users, eq(users.id, sessions.createdBy))
    .where(eq(sessions.id, sessionId));
  return { course: row?.course ?? '', institution: row?.institution ?? null, instructor: row?.instructor ?? null };
}

export const Consent = z.enum(['yes', 'no']);
export type ConsentAnswer = z.infer<typeof Consent>;

/** The consent answer carried from the instructions page through the later steps (a form field). */
export function carriedConsent(design: Design, value: unknown): ConsentAnswer | null | 'missing' {
  if (!design.consent) return null;
  const parsed = Consent.safeParse(value);
  return parsed.success ? parsed.data : 'missing';
}

/** Where a phone goes after the instructions, given what the design asks before play. */
export async function nextStep(
  code: string,
  session: JoinSession,
  userId: number,
  consent: ConsentAnswer | null,
  after: 'instructions' | 'check',
) {
  const q = consent ? `?consent=${consent}` : '';
  if (after === 'instructions' && session.design.comprehension && !(await hasPassed(session.id, userId))) return `/join/${code}/check${q}`;
  if (session.design.practice) return `/join/${code}/practice${q}`;
  return null;
}

/** Into the lobby: the runner adds the participant, then the consent answer is stored. Returns why it could not. */
export async function joinNow(session: JoinSession, userId: number, consent: ConsentAnswer | null): Promise<{ error: string }> {
  const res = await runner().submit(session.id, { type: 'join', participantId: participantKeyOf(userId) });
  if (res.error) return { error: res.error.message };
  if (session.design.consent && consent) await setConsent(session.id, userId, consent === 'yes');
  throw redirect(`/play/${session.id}`);
}
