// A participant's own summary of a session: their supergames and points, nothing about anyone
// else (partners stay anonymous). Staff use the Debrief instead.
import { Link } from 'react-router';
import type { Route } from './+types/mine';
import { ParticipantShell } from '#app/components/shells';
import { getCourseSessions, loadSessionPanel, participantOf } from '#app/models/panel.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['participant', 'instructor', 'assistant', 'researcher']);
  const sessionId = parseId(params.sessionId, 'session');
  const [session] = await getCourseSessions(course.id, [sessionId]);
  respondUnless(session, 404, 'No such session in this course.');
  const me = await participantOf(sessionId, user.id);
  respondUnless(me, 404, 'You did not take part in this session, so it has no summary for you.');
  const { pseudonym } = me;
  // Their own rows only, consent or not (it is their own play); a round their partner has not
  // chosen in yet is not a row.
  const mine = (await loadSessionPanel(course.id, sessionId, { keepDeclined: true, participantKeys: [me.key] }))!.rows;
  const supergames = [...new Set(mine.map((r) => r.supergame))]
    .sort((a, b) => a - b)
    .map((s) => {
      const rows = mine.filter((r) => r.supergame === s);
      return {
        supergame: s,
        rounds: rows.filter((r) => r.paid === 1).length,
        partner: partnerWords(rows.map((r) => r.partner)),
        ownC: rows.filter((r) => r.action === 'C').length,
        partnerC: rows.filter((r) => r.partner_action === 'C').length,
        points: rows.reduce((t, r) => t + (r.paid === 1 ? r.payoff : 0), 0),
      };
    });
  return {
    email: user.email,
    course: { title: course.title, isDemo: course.isDemo },
    session: { treatment: session.treatment, status: session.status, labels: session.design.labels, simulated: session.simulated },
    pseudonym,
    supergames,
    total: supergames.reduce((t, s) => t + s.points, 0),
  };
}

/** Who the partner was, as the participant was told: another participant, a disclosed computer, or one then the other (hand-over). */
function partnerWords(partners: readonly string[]): string {
  const computer = partners.find((p) => p.startsWith('computer:'));
  if (!computer) return 'another participant';
  const words = `a computer (${computer.slice('computer:'.length)}), disclosed`;
  return partners[0].startsWith('computer:') ? words : `another participant, then ${words}`;
}

export default function MySummary({ loaderData }: Route.ComponentProps) {
  const { email, course, session, pseudonym, supergames, total } = loaderData;
  return (
    <ParticipantShell email={email}>
      <div className="flex flex-col gap-1">
        <p className="text-sm text-slate-600">
          {course.title}
          {course.isDemo ? ' · demo, invented data' : ''}
        </p>
        <h1 className="text-2xl font-semibold">Your summary</h1>
        <p className="text-slate-700">
          {session.treatment} · you were <strong>{pseudonym}</strong>
        </p>
      </div>
      <div className="rounded-lg border border-accent-200 bg-white p-4">
        <p className="text-sm text-slate-600">Your points</p>
        <p className="num text-4xl font-semibold" data-testid="total-points">
          {total}
        </p>
        {session.status !== 'complete' && session.status !== 'archived' ? (
          <p className="text-sm text-slate-600">The session is not over yet: this is so far.</p>
        ) : null}
      </div>
      <ul className="flex flex-col gap-3" aria-label="Your supergames">
        {supergames.map((s) => (
          <li key={s.supergame} className="rounded-lg border border-slate-200 bg-white p-4">
            <p className="font-semibold">Supergame {s.supergame}</p>
            <p className="text-slate-700">
              {s.rounds} round{s.rounds === 1 ? '' : 's'} with {s.partner}
            </p>
            <p className="text-slate-700">
              You chose {session.labels.C} {s.ownC}×, your partner {s.partnerC}×
            </p>
            <p className="num text-lg font-semibold">{s.points} points</p>
          </li>
        ))}
      </ul>
      <p className="text-sm text-slate-600">
        Partners stay anonymous: this page shows your own choices and points only.{' '}
        <Link to="/" className="font-semibold text-accent-700 underline">
          Parley’s start page
        </Link>
      </p>
    </ParticipantShell>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Your summary · Parley' }];
