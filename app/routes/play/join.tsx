import { data, Form, redirect } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/join';
import { ParticipantShell } from '#app/components/shells';
import { Button, TextField } from '#app/components/ui';
import { findByJoinCode } from '#app/models/session.server';
import { joinGuessWait, recordJoinMiss } from '#app/utils/join-guesses.server';

const JoinCode = z
  .string()
  .transform((s) => s.toUpperCase().replace(/[\s-]+/g, ''))
  .pipe(z.string().regex(/^[A-HJ-NP-Z2-9]{6}$/, 'A join code has 6 letters and digits (there is no 0, O, 1 or I in it).'));

/** Sessions a phone can still join (or rejoin); any other code gets the same answer as a made-up one. */
const JOINABLE = new Set(['open', 'running', 'paused']);

export async function action({ request, context }: Route.ActionArgs) {
  const form = await request.formData();
  const typed = String(form.get('code') ?? '');
  const parsed = JoinCode.safeParse(typed);
  if (!parsed.success) return data({ error: parsed.error.issues[0].message, code: typed }, { status: 400 });
  // Check the code before anyone types an e-mail address and waits for a sign-in code: a typo
  // should cost a second, not a whole sign-in. One answer only: open, or not.
  const ip = context.clientIp;
  const wait = joinGuessWait(ip);
  if (wait !== null) {
    const minutes = Math.ceil(wait / 60);
    return data(
      {
        error: `Too many codes that match no session were typed on this network. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}, or scan the QR code on the big screen.`,
        code: typed,
      },
      { status: 429, headers: { 'Retry-After': String(wait) } },
    );
  }
  const found = await findByJoinCode(parsed.data);
  if (!found || !JOINABLE.has(found.status)) {
    recordJoinMiss(ip);
    return data(
      { error: 'No session is open with this code. Check the code on the big screen and type it again.', code: typed },
      { status: 404 },
    );
  }
  throw redirect(`/join/${parsed.data}`);
}

// The Retry-After of a refused guess travels with the page.
export const headers: Route.HeadersFunction = ({ actionHeaders }) => actionHeaders;

export default function Join({ actionData }: Route.ComponentProps) {
  return (
    <ParticipantShell>
      <h1 className="text-3xl font-semibold">Join a session</h1>
      <p className="text-lg text-slate-700">Type the code shown on the big screen, or scan its QR code.</p>
      <Form method="post" className="flex flex-col gap-4" noValidate>
        <TextField
          label="Join code"
          name="code"
          autoComplete="off"
          autoCapitalize="characters"
          spellCheck={false}
          maxLength={9}
          defaultValue={actionData?.code}
          error={actionData?.error}
          className="[&_input]:text-center [&_input]:font-mono [&_input]:text-3xl [&_input]:tracking-[0.3em] [&_input]:uppercase"
        />
        <Button type="submit" className="min-h-14 text-lg">
          Continue
        </Button>
      </Form>
    </ParticipantShell>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Join a session · Parley' }];
