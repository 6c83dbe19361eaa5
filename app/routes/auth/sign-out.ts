import { redirect } from 'react-router';
import type { Route } from './+types/sign-out';
import { authSessionStorage, getAuthSession } from '#app/utils/auth.server';

export async function action({ request }: Route.ActionArgs) {
  const session = await getAuthSession(request);
  return redirect('/', { headers: { 'Set-Cookie': await authSessionStorage().destroySession(session) } });
}

export function loader() {
  return redirect('/');
}
