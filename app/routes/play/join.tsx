import { data, Form, redirect } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/join';
import { ParticipantShell } from '#app/components/shells';
import { Button, TextField } from '#app/components/ui';

const JoinCode = z
  .string()
  .transform((s) => s.toUpperCase().replace(/[\s-]+/g, ''))
  .pipe(z.string().regex(/^[A-HJ-NP-Z2-9]{6}$/, 'A join code has 6 letters and digits (there is no 0, O, 1 or I in it).'));

export async function action({ request }: Route.ActionArgs) {
  const form = await request.formData();
  const parsed = JoinCode.safeParse(String(form.get('code') ?? ''));
  if (!parsed.success) return data({ error: parsed.error.issues[0].message, code: String(form.get('code') ?? '') }, { status: 400 });
  throw redirect(`/join/${parsed.data}`);
}

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
