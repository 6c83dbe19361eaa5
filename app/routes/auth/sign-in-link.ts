import type { Route } from './+types/sign-in-link';
import { authenticator } from '#app/utils/auth.server';

// The magic link in the sign-in e-mail: the strategy validates it (same device: it needs the
// pending-code cookie) and redirects to the app or back to the code page with a message.
export async function loader({ request }: Route.LoaderArgs) {
  await authenticator().authenticate('TOTP', request);
  throw new Error('the sign-in strategy returned without a redirect');
}
