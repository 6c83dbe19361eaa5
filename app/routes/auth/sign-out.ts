import { redirect } from 'react-router';
import type { Route } from './+types/sign-out';
import { signOut } from '#app/utils/auth.server';

// Ends the sign-in on the server (a copied cookie is dead afterwards); `intent=everywhere` ends
// every sign-in of the account, on every device.
export async function action({ request }: Route.ActionArgs) {
  const form = await request.formData();
  const cookie = await signOut(request, { everywhere: form.get('intent') === 'everywhere' });
  return redirect('/', { headers: { 'Set-Cookie': cookie } });
}

export function loader() {
  return redirect('/');
}
