import { Outlet, useRouteLoaderData } from 'react-router';
import type { Route } from './+types/layout';
import { RouteErrorPage } from '#app/components/error-page';
import { StaffShell } from '#app/components/shells';
import { requireUser } from '#app/utils/auth.server';

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { user: { email: user.email, isAdmin: user.isAdmin } };
}

export default function StaffLayout({ loaderData }: Route.ComponentProps) {
  return (
    <StaffShell user={loaderData.user}>
      <Outlet />
    </StaffShell>
  );
}

/** A staff page that is not found (or not for this role) keeps the shell: its navigation and a title. */
export function ErrorBoundary() {
  const data = useRouteLoaderData<typeof loader>('routes/staff/layout');
  if (!data) return <RouteErrorPage />;
  return (
    <StaffShell user={data.user}>
      <RouteErrorPage inShell />
    </StaffShell>
  );
}
