import { Form } from 'react-router';
import type { Route } from './+types/account';
import { ParticipantShell } from '#app/components/shells';
import { Button, EmailAddress } from '#app/components/ui';
import { listSignIns, requireUser, signedInFromCookie } from '#app/utils/auth.server';

// Where an account sees the devices it is signed in on and can end them all (a lost phone, a
// shared computer in a lab).
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const [signIns, current] = await Promise.all([listSignIns(user.id), signedInFromCookie(request.headers.get('Cookie'))]);
  return {
    email: user.email,
    signIns: signIns.map((s) => ({
      current: s.id === current?.authKey,
      since: s.createdAt.toISOString(),
      lastSeen: s.lastSeenAt.toISOString(),
      device: describeDevice(s.userAgent),
    })),
  };
}

/** A rough, readable name for a browser (a full user-agent string helps nobody here). */
function describeDevice(ua: string | null) {
  if (!ua) return 'Unknown device';
  const os = /iPhone|iPad/.test(ua)
    ? 'iPhone or iPad'
    : /Android/.test(ua)
      ? 'Android'
      : /Mac OS X/.test(ua)
        ? 'Mac'
        : /Windows/.test(ua)
          ? 'Windows'
          : /Linux/.test(ua)
            ? 'Linux'
            : 'another system';
  const browser = /Edg\//.test(ua)
    ? 'Edge'
    : /Firefox\//.test(ua)
      ? 'Firefox'
      : /Chrome\//.test(ua)
        ? 'Chrome'
        : /Safari\//.test(ua)
          ? 'Safari'
          : 'A browser';
  return `${browser} on ${os}`;
}

const when = (iso: string) => new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC' }) + ' UTC';

export default function Account({ loaderData }: Route.ComponentProps) {
  const { email, signIns } = loaderData;
  return (
    <ParticipantShell email={email}>
      <div className="flex flex-col gap-2">
        <h1 className="text-3xl font-semibold">Your sign-ins</h1>
        <p className="text-lg text-slate-700">
          Signed in as{' '}
          <strong>
            <EmailAddress email={email} />
          </strong>
          . These devices are signed in to your account.
        </p>
      </div>
      <ul className="flex flex-col gap-3" aria-label="Devices signed in">
        {signIns.map((s, i) => (
          <li key={i} className="rounded-lg border border-slate-200 bg-white p-3">
            <p className="font-semibold">
              {s.device}
              {s.current ? <span className="ml-2 text-sm font-normal text-accent-700">(this device)</span> : null}
            </p>
            <p className="text-sm text-slate-600">
              Signed in {when(s.since)} · last active {when(s.lastSeen)}
            </p>
          </li>
        ))}
      </ul>
      <Form method="post" action="/sign-out" className="flex flex-col gap-2">
        <input type="hidden" name="intent" value="everywhere" />
        <Button type="submit" variant="quiet">
          Sign out everywhere
        </Button>
        <p className="text-sm text-slate-600">
          Ends every sign-in above, this one included. Live pages on those devices disconnect at once.
        </p>
      </Form>
    </ParticipantShell>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Your sign-ins · Parley' }];
