import { redirect } from 'react-router';
import type { Route } from './+types/sign-in-link';
import { codeState, countWrongTry, pendingCode, strategyFailed, verifyCode } from '#app/utils/sign-in.server';

// The magic link in the sign-in e-mail: the strategy checks it (same device: it needs the
// pending-code cookie), and Parley's record of the code decides whether it may sign in
// (app/utils/sign-in.server.ts); then on to the app, or back to the code page with a message.
export async function loader({ request, context }: Route.LoaderArgs) {
  const pending = pendingCode(request);
  if (!pending.email) throw redirect('/sign-in');
  const state = await codeState(pending);
  if (!state.ok) throw redirect(`/sign-in/code?refused=${state.reason}`);
  try {
    return await verifyCode(request, pending, { request, ip: context.clientIp });
  } catch (thrown) {
    if (strategyFailed(thrown)) await countWrongTry(pending, context.clientIp);
    throw thrown;
  }
}
