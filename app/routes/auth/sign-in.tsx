import { data, Form, redirect, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/sign-in';
import { ParticipantShell } from '#app/components/shells';
import { Button, Notice, TextField } from '#app/components/ui';
import { authSessionStorage, getAuthSession, getUser, safeRedirect } from '#app/utils/auth.server';
import { checkCodeRequestLimits, issueCode } from '#app/utils/sign-in.server';
import { formatWait } from '#app/utils/format';
import { strategyRequest, withCookie } from '#app/utils/http.server';

const SignInForm = z.object({
  email: z.email('Enter an e-mail address such as name@university.edu.').max(254, 'That address is too long.'),
  redirectTo: z.string().optional(),
});

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const redirectTo = safeRedirect(url.searchParams.get('redirectTo'));
  if (await getUser(request)) throw redirect(redirectTo);
  return { redirectTo };
}

export async function action({ request, context }: Route.ActionArgs) {
  const form = await request.clone().formData();
  const parsed = SignInForm.safeParse({ email: String(form.get('email') ?? '').trim(), redirectTo: form.get('redirectTo') ?? undefined });
  if (!parsed.success) {
    return data(
      { errors: { email: parsed.error.issues[0]?.message } as { email?: string }, limited: null, email: String(form.get('email') ?? '') },
      { status: 400 },
    );
  }
  const email = parsed.data.email.toLowerCase();
  const ip = context.clientIp;
  const limited = await checkCodeRequestLimits(email, ip);
  if (limited)
    return data(
      { errors: {} as { email?: string }, limited, email },
      { status: 429, headers: { 'Retry-After': String(limited.retryAfterSeconds) } },
    );

  const session = await getAuthSession(request);
  session.set('redirectTo', safeRedirect(parsed.data.redirectTo));
  const cookie = await authSessionStorage().commitSession(session);
  // The strategy re-reads the body, so hand it a request whose e-mail is normalised.
  const { issue, response } = await issueCode(strategyRequest(request, { email }), email, ip);
  // Mail server down or slow: say so on this form, keep what was typed, count nothing.
  if (!issue.sent) return data({ errors: { email: issue.message } as { email?: string }, limited: null, email }, { status: 503 });
  throw withCookie(response, cookie);
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === 'submitting';
  return (
    <ParticipantShell>
      <div className="flex flex-col gap-2">
        <h1 className="text-3xl font-semibold">Sign in</h1>
        <p className="text-lg text-slate-700">We e-mail you a six-digit code. No password, nothing to install.</p>
      </div>
      {actionData?.limited ? (
        <Notice tone="error" title="Too many requests">
          {actionData.limited.reason} Try again in {formatWait(actionData.limited.retryAfterSeconds)}.
        </Notice>
      ) : null}
      <Form method="post" className="flex flex-col gap-4" noValidate>
        <input type="hidden" name="redirectTo" value={loaderData.redirectTo} />
        <TextField
          label="E-mail address"
          name="email"
          type="email"
          inputMode="email"
          autoComplete="email"
          autoCapitalize="none"
          spellCheck={false}
          required
          autoFocus
          defaultValue={actionData?.email}
          error={actionData?.errors?.email}
        />
        <Button type="submit" disabled={busy} className="min-h-14 text-lg">
          {busy ? 'Sending…' : 'E-mail me a code'}
        </Button>
      </Form>
      <p className="text-sm text-slate-600">
        Parley stores your e-mail address to sign you in and, in a course, to link your choices to you. Exports for research use pseudonyms,
        not names or addresses.
      </p>
    </ParticipantShell>
  );
}

export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => {
  const retry = actionHeaders.get('Retry-After');
  return retry ? { 'Retry-After': retry } : loaderHeaders;
};

export const meta: Route.MetaFunction = () => [{ title: 'Sign in · Parley' }];
