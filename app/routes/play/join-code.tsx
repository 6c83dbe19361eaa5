import { useEffect, useRef } from 'react';
import { data, Form, redirect, useNavigation } from 'react-router';
import type { Route } from './+types/join-code';
import { InstructionsBody, InstructionsHeading } from '#app/components/instructions-view';
import { ParticipantShell } from '#app/components/shells';
import { Button, FieldError, Notice } from '#app/components/ui';
import { fillInstructions, instructionSummary, payoffRows } from '#app/lib/instructions';
import { requireUser } from '#app/utils/auth.server';
import { admission, carriedConsent, joinNow, nextStep, sendJoinedToPlay, sessionHeading } from '#app/utils/join.server';
import { lateEntryRefusal } from '#realtime/engine/supergames';

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const admitted = await admission(params.code, user);
  const { session } = admitted;
  const state = await sendJoinedToPlay(session, user, admitted.refusal);
  // Said before the instructions are read, not after: nobody new can enter the last supergame.
  const refusal = admitted.refusal ?? (state ? lateEntryRefusal(state) : null);
  const d = session.design;
  return {
    code: params.code.toUpperCase(),
    email: user.email,
    refusal,
    heading: await sessionHeading(session.id),
    late: state?.status === 'running' || state?.status === 'paused',
    summary: instructionSummary(d),
    instructions: fillInstructions(d),
    consent: d.consent,
    // Another step follows the instructions: the button says "continue", not "join".
    stepsBefore: d.comprehension || d.practice,
    labels: d.labels,
    table: payoffRows(d.payoffs),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const { session, refusal } = await admission(params.code, user);
  if (refusal) return data({ error: refusal, field: null, consent: null }, { status: 403 });
  const form = await request.formData();
  const consent = carriedConsent(session.design, form.get('consent'));
  if (consent === 'missing') {
    return data({ error: 'Choose whether your choices may be used for research.', field: 'consent', consent: null }, { status: 400 });
  }
  const next = await nextStep(params.code.toUpperCase(), session, user.id, consent, 'instructions');
  if (next) throw redirect(next);
  const { error } = await joinNow(session, user.id, consent);
  // Keep the answer ticked on the page that says why joining failed.
  return data({ error, field: null, consent }, { status: 409 });
}

/*
 * public/remember-consent.js runs as the server's page is parsed, before React takes over, and
 * remembers which consent answer was ticked. If React has to draw the page again when it hydrates
 * (a phone's browser rewrote part of it first, e.g. iOS turning numbers into telephone links), the
 * tick would be lost; useRememberedConsent ticks it again.
 */
declare global {
  interface Window {
    __parleyConsent?: { path: string; value: string };
  }
}

/** Ticks again the answer given before hydration when React's drawing of the page lost it. */
function useRememberedConsent() {
  const form = useRef<HTMLFormElement>(null);
  useEffect(() => {
    const remembered = window.__parleyConsent;
    const radios = form.current?.elements.namedItem('consent');
    if (!remembered || remembered.path !== window.location.pathname || !(radios instanceof RadioNodeList) || radios.value) return;
    radios.value = remembered.value;
  }, []);
  return form;
}

export default function JoinSession({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === 'submitting';
  const { refusal, instructions, labels, table, consent, late, heading, summary, stepsBefore } = loaderData;
  const form = useRememberedConsent();
  const answered = actionData?.consent ?? null;
  return (
    <ParticipantShell email={loaderData.email}>
      <InstructionsHeading heading={heading} code={loaderData.code} />
      {refusal ? (
        <Notice tone="error">{refusal}</Notice>
      ) : (
        <>
          {late ? <Notice>The session is already running: you will be paired from the next supergame on.</Notice> : null}
          <InstructionsBody summary={summary} table={table} labels={labels} instructions={instructions} />
          {/* public/remember-consent.js: a file of ours, so the Content-Security-Policy lets it run */}
          {consent ? <script src="/remember-consent.js" /> : null}
          <Form method="post" className="flex flex-col gap-4" ref={form}>
            {consent ? (
              <fieldset className="flex flex-col gap-2 rounded-lg border border-slate-200 bg-white p-4">
                <legend className="px-1 font-semibold">Research use of your choices</legend>
                <p className="text-sm text-slate-700">
                  Your instructor may use the class’s choices, without names, for research approved by the institution’s ethics board. Your
                  answer does not change your points or your grade.
                </p>
                <label className="flex min-h-12 items-center gap-3">
                  <input type="radio" name="consent" value="yes" defaultChecked={answered === 'yes'} className="size-5" /> Yes, my choices
                  may be used for research
                </label>
                <label className="flex min-h-12 items-center gap-3">
                  <input type="radio" name="consent" value="no" defaultChecked={answered === 'no'} className="size-5" /> No, leave my
                  choices out of research
                </label>
                {actionData?.field === 'consent' ? <FieldError>{actionData.error}</FieldError> : null}
              </fieldset>
            ) : null}
            {actionData?.error && actionData.field === null ? <Notice tone="error">{actionData.error}</Notice> : null}
            <Button type="submit" disabled={busy} className="min-h-16 text-xl">
              {busy ? (stepsBefore ? 'One moment…' : 'Joining…') : stepsBefore ? 'I have read this — continue' : 'I have read this — join'}
            </Button>
          </Form>
        </>
      )}
    </ParticipantShell>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [
  { title: `${data?.heading.course ? `${data.heading.course} · ` : ''}Before you play · Parley` },
];
