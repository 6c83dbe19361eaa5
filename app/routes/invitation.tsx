import { data, Form, Link, redirect } from 'react-router';
import type { Route } from './+types/invitation';
import { ParticipantShell } from '#app/components/shells';
import { Button, Notice, EmailAddress } from '#app/components/ui';
import { acceptInvitation, findInvitation } from '#app/models/course.server';
import { getUser, requireUser } from '#app/utils/auth.server';
import { respondUnless } from '#app/utils/http.server';
import { ROLE_WORDS } from '#app/utils/format';

export async function loader({ request, params }: Route.LoaderArgs) {
  const inv = await findInvitation(params.token);
  respondUnless(inv, 404, 'This invitation link is not valid. Check that you opened the whole link from the e-mail.');
  const user = await getUser(request);
  const problem = inv.revokedAt
    ? 'This invitation was withdrawn or replaced by a newer one.'
    : inv.acceptedAt
      ? 'This invitation has already been accepted.'
      : inv.expiresAt < new Date()
        ? 'This invitation has expired. Ask for a new one.'
        : user && user.email !== inv.email
          ? `This invitation was sent to ${inv.email}, but you are signed in as ${user.email}. Sign out and sign in with that address.`
          : null;
  return {
    invitation: { courseTitle: inv.courseTitle, role: inv.role, email: inv.email },
    signedIn: Boolean(user),
    email: user?.email ?? null,
    problem,
    signInHref: `/sign-in?redirectTo=${encodeURIComponent(`/invitations/${params.token}`)}`,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const res = await acceptInvitation(params.token, user);
  if (!res.ok) return data({ message: res.message }, { status: 400 });
  throw redirect(res.role === 'participant' ? '/' : `/courses/${res.courseId}`);
}

export default function Invitation({ loaderData, actionData }: Route.ComponentProps) {
  const { invitation, signedIn, problem, email } = loaderData;
  return (
    <ParticipantShell email={email}>
      <h1 className="text-3xl font-semibold">Invitation</h1>
      <p className="text-lg text-slate-700">
        You are invited to join <strong>{invitation.courseTitle}</strong> as {ROLE_WORDS[invitation.role].toLowerCase()}.
      </p>
      {problem ? <Notice tone="error">{problem}</Notice> : null}
      {actionData?.message ? <Notice tone="error">{actionData.message}</Notice> : null}
      {!problem && !signedIn ? (
        <>
          <p className="text-slate-700">
            Sign in with{' '}
            <strong>
              <EmailAddress email={invitation.email} />
            </strong>{' '}
            to accept. We e-mail you a code; no password.
          </p>
          <Link
            to={loaderData.signInHref}
            className="inline-flex min-h-14 items-center justify-center rounded-lg bg-accent-700 px-4 text-lg font-semibold text-white hover:bg-accent-800"
          >
            Sign in to accept
          </Link>
        </>
      ) : null}
      {!problem && signedIn ? (
        <Form method="post">
          <Button type="submit" className="min-h-14 w-full text-lg">
            Accept and join
          </Button>
        </Form>
      ) : null}
    </ParticipantShell>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Invitation · Parley' }];
