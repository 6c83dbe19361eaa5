import { data, Form, Link, redirect, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/sign-in-code';
import { ParticipantShell } from '#app/components/shells';
import { Button, Notice, TextField, EmailAddress } from '#app/components/ui';
import { getUser } from '#app/utils/auth.server';
import { formatWait } from '#app/utils/format';
import { strategyRequest } from '#app/utils/http.server';
import {
  checkCodeRequestLimits,
  CODE_MINUTES,
  codeState,
  countWrongTry,
  issueCode,
  pendingCode,
  refusalMessage,
  strategyFailed,
  verifyCode,
} from '#app/utils/sign-in.server';

const CodeForm = z.object({
  code: z
    .string()
    .transform((s) => s.replace(/\s+/g, ''))
    .pipe(z.string().regex(/^\d{6}$/, 'The code has six digits.')),
});

type Refused = { reason: string; title: string; retryAfterSeconds: number | null };

export async function loader({ request }: Route.LoaderArgs) {
  if (await getUser(request)) throw redirect('/');
  const pending = pendingCode(request);
  const error = refusalMessage(new URL(request.url).searchParams.get('refused')) ?? pending.error;
  if (!pending.email && !error) throw redirect('/sign-in');
  return { email: pending.email, error, minutes: CODE_MINUTES };
}

export async function action({ request, context }: Route.ActionArgs) {
  const form = await request.clone().formData();
  const pending = pendingCode(request);
  const email = pending.email;
  if (!email) throw redirect('/sign-in');
  const ip = context.clientIp;
  const refuse = (status: number, refused: Refused) =>
    data(
      { errors: {} as { code?: string }, refused },
      { status, headers: refused.retryAfterSeconds ? { 'Retry-After': String(refused.retryAfterSeconds) } : undefined },
    );

  if (form.get('intent') === 'resend') {
    const limited = await checkCodeRequestLimits(email, ip);
    if (limited) return refuse(429, { title: 'Too many requests', reason: limited.reason, retryAfterSeconds: limited.retryAfterSeconds });
    // No e-mail and no code in the form: the strategy sends a new code to the pending address.
    const { issue, response } = await issueCode(strategyRequest(request, {}), email, ip);
    if (!issue.sent) return refuse(503, { title: 'Not sent', reason: issue.message, retryAfterSeconds: null });
    throw response;
  }

  const parsed = CodeForm.safeParse({ code: String(form.get('code') ?? '') });
  if (!parsed.success) return data({ errors: { code: parsed.error.issues[0]?.message }, refused: null }, { status: 400 });
  // Parley's record of the code decides, not the cookie (app/utils/sign-in.server.ts).
  const state = await codeState(pending);
  if (!state.ok)
    return refuse(state.reason === 'dead' ? 429 : 400, {
      title: 'This code no longer works',
      reason: state.message,
      retryAfterSeconds: null,
    });
  try {
    return await verifyCode(strategyRequest(request, { code: parsed.data.code }), pending, { request, ip });
  } catch (thrown) {
    // The strategy answers a wrong or expired code with a redirect back to this page.
    if (strategyFailed(thrown)) await countWrongTry(pending, ip);
    throw thrown;
  }
}

export default function SignInCode({ loaderData, actionData }: Route.ComponentProps) {
  const nav = useNavigation();
  const busy = nav.state === 'submitting';
  return (
    <ParticipantShell>
      <div className="flex flex-col gap-2">
        <h1 className="text-3xl font-semibold">Check your e-mail</h1>
        {loaderData.email ? (
          <p className="text-lg text-slate-700">
            We sent a six-digit code to{' '}
            <strong>
              <EmailAddress email={loaderData.email} />
            </strong>
            . It works for {loaderData.minutes} minutes. You can also open the link in the e-mail on this device.
          </p>
        ) : null}
      </div>
      {loaderData.error ? <Notice tone="error">{loaderData.error}</Notice> : null}
      {actionData?.refused ? (
        <Notice tone="error" title={actionData.refused.title}>
          {actionData.refused.reason}
          {actionData.refused.retryAfterSeconds ? ` Try again in ${formatWait(actionData.refused.retryAfterSeconds)}.` : null}
        </Notice>
      ) : null}
      {loaderData.email ? (
        <>
          <Form method="post" className="flex flex-col gap-4" noValidate>
            <TextField
              label="Sign-in code"
              name="code"
              inputMode="numeric"
              autoComplete="one-time-code"
              pattern="[0-9 ]*"
              maxLength={8}
              required
              autoFocus
              className="[&_input]:text-center [&_input]:text-3xl [&_input]:tracking-[0.3em]"
              error={actionData?.errors && 'code' in actionData.errors ? actionData.errors.code : undefined}
            />
            <Button type="submit" name="intent" value="verify" disabled={busy} className="min-h-14 text-lg">
              {busy && nav.formData?.get('intent') === 'verify' ? 'Checking…' : 'Sign in'}
            </Button>
          </Form>
          <Form method="post" className="flex flex-wrap items-center gap-x-4 gap-y-2">
            <Button type="submit" name="intent" value="resend" variant="quiet" disabled={busy}>
              Send a new code
            </Button>
            <Link to="/sign-in" className="min-h-11 content-center font-semibold text-accent-700 underline-offset-4 hover:underline">
              Use another e-mail address
            </Link>
          </Form>
        </>
      ) : (
        <Link to="/sign-in" className="font-semibold text-accent-700 underline underline-offset-4">
          Start again
        </Link>
      )}
    </ParticipantShell>
  );
}

export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => {
  const retry = actionHeaders.get('Retry-After');
  return retry ? { 'Retry-After': retry } : loaderHeaders;
};

export const meta: Route.MetaFunction = () => [{ title: 'Enter your code · Parley' }];
