import { Outlet } from 'react-router';
import type { Route } from './+types/layout';
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
