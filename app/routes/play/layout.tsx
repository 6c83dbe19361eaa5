import { Outlet } from 'react-router';
import { RouteErrorPage } from '#app/components/error-page';
import { ParticipantShell } from '#app/components/shells';

// The participants' phone pages (join, the steps before the lobby, the game, a participant's own
// summary). Each page draws its own shell with the signed-in address; this layout is only here so
// an error on one of them (a 404, a 403) keeps the phone shell. No loader: a lecture hall of
// phones loads these pages at once, and an error page does without the address.
export default function ParticipantLayout() {
  return <Outlet />;
}

export function ErrorBoundary() {
  return (
    <ParticipantShell>
      <RouteErrorPage inShell />
    </ParticipantShell>
  );
}
