import { Link, redirect } from 'react-router';
import type { Route } from './+types/home';
import { ParticipantShell, Wordmark } from '#app/components/shells';
import { DemoBadge, EmailAddress } from '#app/components/ui';
import { listCoursesForUser } from '#app/models/course.server';
import { leaguesForParticipant } from '#app/models/league.server';
import { sessionsOfParticipant } from '#app/models/session.server';
import { getUser } from '#app/utils/auth.server';
import { formatDateTime, ROLE_WORDS } from '#app/utils/format';
import { mayCreateCourses } from '#app/utils/permissions.server';

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  if (!user) return { user: null, courses: [], played: [], leagues: [], canCreate: false };
  const courses = await listCoursesForUser(user.id, false);
  // Staff land on their courses; participants stay on this phone-first page.
  if (user.isAdmin || courses.some((c) => c.role !== 'participant')) throw redirect('/courses');
  const [played, canCreate, leagues] = await Promise.all([
    sessionsOfParticipant(user.id),
    mayCreateCourses(user),
    leaguesForParticipant(user.id),
  ]);
  return {
    user: { email: user.email },
    courses: courses.map((c) => ({ id: c.id, title: c.title, term: c.term, isDemo: c.isDemo })),
    played,
    leagues: leagues.map((l) => ({
      id: l.id,
      title: l.title,
      courseTitle: l.courseTitle,
      state: l.state,
      accepting: l.accepting,
      hasEntry: l.hasEntry,
      deadline: l.deadline?.toISOString() ?? null,
    })),
    canCreate,
  };
}

export default function Home({ loaderData }: Route.ComponentProps) {
  if (!loaderData.user) return <Landing />;
  return (
    <ParticipantShell email={loaderData.user.email}>
      <h1 className="text-3xl font-semibold">Hello</h1>
      <p className="text-lg text-slate-700">
        You are signed in as{' '}
        <strong>
          <EmailAddress email={loaderData.user.email} />
        </strong>
        . When your instructor opens a session, follow the join code or QR code on the big screen.
      </p>
      <Link
        to="/join"
        className="inline-flex min-h-14 items-center justify-center rounded-lg bg-accent-700 px-4 text-lg font-semibold text-white hover:bg-accent-800"
      >
        Join a session with a code
      </Link>
      <section aria-labelledby="my-courses" className="flex flex-col gap-3">
        <h2 id="my-courses" className="text-xl font-semibold">
          Your courses
        </h2>
        {loaderData.courses.length === 0 ? (
          <p className="text-slate-600">You are not in a course yet. An invitation e-mail or a join code adds you.</p>
        ) : (
          <ul className="flex flex-col gap-2">
            {loaderData.courses.map((c) => (
              <li key={c.id} className="flex flex-col gap-1 rounded-lg border border-slate-200 bg-white p-4">
                <span className="text-lg font-semibold">{c.title}</span>
                <span className="flex flex-wrap items-center gap-2 text-sm text-slate-600">
                  {ROLE_WORDS.participant}
                  {c.term ? ` · ${c.term}` : ''}
                  {c.isDemo ? <DemoBadge /> : null}
                </span>
              </li>
            ))}
          </ul>
        )}
      </section>
      {loaderData.leagues.length ? (
        <section aria-labelledby="my-leagues" className="flex flex-col gap-3">
          <h2 id="my-leagues" className="text-xl font-semibold">
            Strategy leagues
          </h2>
          <ul className="flex flex-col gap-2" data-testid="my-leagues">
            {loaderData.leagues.map((l) => (
              <li key={l.id} className="flex flex-col gap-1 rounded-lg border border-slate-200 bg-white p-4">
                <span className="text-lg font-semibold">{l.title}</span>
                <span className="text-sm text-slate-600">
                  {l.courseTitle}
                  {' · '}
                  {l.accepting
                    ? `${l.hasEntry ? 'your entry is in' : 'no entry from you yet'}${l.deadline ? ` · entries until ${formatDateTime(l.deadline)}` : ''}`
                    : l.state === 'published'
                      ? 'results published'
                      : 'entries closed'}
                </span>
                <Link to={`/play/leagues/${l.id}`} className="min-h-11 content-center font-semibold text-accent-700 underline">
                  {l.accepting
                    ? l.hasEntry
                      ? 'Revise your strategy'
                      : 'Enter your strategy'
                    : l.state === 'published'
                      ? 'See the results'
                      : l.hasEntry
                        ? 'See your entry'
                        : 'About this league'}
                </Link>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      {loaderData.played.length ? (
        <section aria-labelledby="my-sessions" className="flex flex-col gap-3">
          <h2 id="my-sessions" className="text-xl font-semibold">
            Your sessions
          </h2>
          <ul className="flex flex-col gap-2">
            {loaderData.played.map((s) => (
              <li key={s.id} className="flex flex-wrap items-center justify-between gap-2 rounded-lg border border-slate-200 bg-white p-4">
                <span>
                  Session #{s.id} · you were {s.pseudonym}
                </span>
                {s.status === 'complete' || s.status === 'archived' ? (
                  <Link
                    to={`/courses/${s.courseId}/debrief/${s.id}/mine`}
                    className="min-h-11 content-center font-semibold text-accent-700 underline"
                  >
                    Your summary
                  </Link>
                ) : (
                  <Link to={`/play/${s.id}`} className="min-h-11 content-center font-semibold text-accent-700 underline">
                    Back to the session
                  </Link>
                )}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      {loaderData.canCreate ? (
        <p className="text-sm text-slate-600">
          Teaching a class?{' '}
          <Link to="/courses/new" className="font-semibold text-accent-700 underline underline-offset-4">
            Create a course
          </Link>{' '}
          and you become its instructor.
        </p>
      ) : (
        <p className="text-sm text-slate-600">Teaching a class? Ask a site administrator of Parley to let your account create courses.</p>
      )}
    </ParticipantShell>
  );
}

function Landing() {
  const steps = [
    [
      'Design',
      'Pick payoffs and a continuation probability δ on the right side of the theory’s thresholds, and see how long it will take in class.',
    ],
    ['Enrol', 'Students join on their phones with a code from the big screen and a one-time code by e-mail. No app, no passwords.'],
    [
      'Run',
      'Random-termination supergames with random re-matching, a draw common to the whole room, and a live floor view for assistants.',
    ],
    ['Debrief', 'Cooperation against the theory and the strategies the class actually used, on the projector the same hour.'],
    ['Share', 'A clean, de-identified choice panel with a codebook, for research and for the gradebook.'],
  ];
  return (
    <div className="min-h-dvh bg-white">
      <header className="mx-auto flex max-w-5xl items-center justify-between px-6 py-4">
        <Wordmark />
        <span className="flex gap-2">
          <Link
            to="/join"
            className="inline-flex min-h-11 items-center rounded-lg px-4 font-semibold text-accent-700 ring-1 ring-accent-300 hover:bg-accent-50"
          >
            Join with a code
          </Link>
          <Link
            to="/sign-in"
            className="inline-flex min-h-11 items-center rounded-lg bg-accent-700 px-4 font-semibold text-white hover:bg-accent-800"
          >
            Sign in
          </Link>
        </span>
      </header>
      <main className="mx-auto flex max-w-5xl flex-col gap-10 px-6 pt-8 pb-16">
        <section className="flex max-w-3xl flex-col gap-4">
          <h1 className="text-4xl font-semibold text-slate-900 sm:text-5xl">
            Let your class feel why cooperation survives when the future matters.
          </h1>
          <p className="text-xl text-slate-700">
            Parley runs repeated prisoner’s-dilemma experiments live on students’ phones and turns the choices into research-grade data and
            analysis in the same hour.
          </p>
        </section>
        <ol className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
          {steps.map(([title, text], i) => (
            <li key={title} className="flex flex-col gap-2 rounded-xl border border-slate-200 bg-slate-50 p-4">
              <span className="text-sm font-semibold text-accent-700">
                {i + 1}. {title}
              </span>
              <span className="text-slate-700">{text}</span>
            </li>
          ))}
        </ol>
        <p className="max-w-3xl text-sm text-slate-600">
          Using classroom data for research needs your institution’s ethics-board approval and the participants’ informed consent. Parley
          records consent and exports pseudonyms by default; the decision is your institution’s.
        </p>
      </main>
    </div>
  );
}

export const meta: Route.MetaFunction = () => [
  { title: 'Parley — repeated-game experiments in class' },
  { name: 'description', content: 'Run repeated prisoner’s-dilemma experiments live on students’ phones.' },
];
