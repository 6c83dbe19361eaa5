import { useEffect, useRef } from 'react';
import { data, Form, redirect, useNavigation } from 'react-router';
import type { Route } from './+types/join-code';
import { PayoffTable } from '#app/components/live/payoff-table';
import { ParticipantShell } from '#app/components/shells';
import { Button, FieldError, Notice } from '#app/components/ui';
import { getSession, participantKeyOf } from '#app/models/live.server';
import { findByJoinCode, setConsent } from '#app/models/session.server';
import { type CurrentUser, requireUser } from '#app/utils/auth.server';
import { roleIn } from '#app/utils/permissions.server';
import { runner } from '#app/utils/runner.server';

/** Who may join: roster sessions admit course members; open ones anyone (by e-mail domain if set). */
async function admission(code: string, user: CurrentUser) {
  const found = await findByJoinCode(code);
  if (!found) throw new Response('There is no session with this code. Check the code on the big screen.', { status: 404 });
  const session = (await getSession(found.id))!;
  if (found.status === 'complete') return { session, refusal: 'This session has ended.' };
  if (found.admission === 'roster' && !(await roleIn(found.courseId, user.id))) {
    return { session, refusal: 'This session admits the members of its course only. Ask your instructor for an invitation to the course.' };
  }
  if (found.admission === 'open' && found.emailDomain && !user.email.endsWith(`@${found.emailDomain}`)) {
    return { session, refusal: `This session admits e-mail addresses ending in @${found.emailDomain}. Sign in with that address.` };
  }
  return { session, refusal: null };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const { session, refusal } = await admission(params.code, user);
  const state = await runner().state(session.id);
  if (!refusal && state?.participants[participantKeyOf(user.id)]) throw redirect(`/play/${session.id}`);
  const d = session.design;
  const { R, S, T, P } = d.payoffs;
  return {
    code: params.code.toUpperCase(),
    email: user.email,
    refusal,
    late: state?.status === 'running' || state?.status === 'paused',
    instructions: d.instructions,
    consent: d.consent,
    labels: d.labels,
    table: [
      { own: 'C' as const, partner: 'C' as const, ownPoints: R, partnerPoints: R },
      { own: 'C' as const, partner: 'D' as const, ownPoints: S, partnerPoints: T },
      { own: 'D' as const, partner: 'C' as const, ownPoints: T, partnerPoints: S },
      { own: 'D' as const, partner: 'D' as const, ownPoints: P, partnerPoints: P },
    ],
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const { session, refusal } = await admission(params.code, user);
  if (refusal) return data({ error: refusal, field: null, consent: null }, { status: 403 });
  const form = await request.formData();
  const consent = form.get('consent');
  if (session.design.consent && consent !== 'yes' && consent !== 'no') {
    return data({ error: 'Choose whether your choices may be used for research.', field: 'consent', consent: null }, { status: 400 });
  }
  const res = await runner().dispatch(session.id, { type: 'join', participantId: participantKeyOf(user.id) });
  // Keep the answer ticked on the page that says why joining failed.
  if (res.error) return data({ error: res.error.message, field: null, consent: typeof consent === 'string' ? consent : null }, { status: 409 });
  if (session.design.consent) await setConsent(session.id, user.id, consent === 'yes');
  throw redirect(`/play/${session.id}`);
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
  const { refusal, instructions, labels, table, consent, late } = loaderData;
  const form = useRememberedConsent();
  const answered = actionData?.consent ?? null;
  return (
    <ParticipantShell email={loaderData.email}>
      <h1 className="text-3xl font-semibold">Session {loaderData.code}</h1>
      {refusal ? (
        <Notice tone="error">{refusal}</Notice>
      ) : (
        <>
          {late ? <Notice>The session is already running: you will be paired from the next supergame on.</Notice> : null}
          <section aria-labelledby="how" className="flex flex-col gap-3">
            <h2 id="how" className="text-xl font-semibold">
              How it works
            </h2>
            <PayoffTable table={table} labels={labels} />
            <div className="flex flex-col gap-3 text-base leading-relaxed whitespace-pre-line text-slate-800">{instructions}</div>
          </section>
          {/* public/remember-consent.js: a file of ours, so the Content-Security-Policy lets it run */}
          {consent ? <script src="/remember-consent.js" /> : null}
          <Form method="post" className="flex flex-col gap-4" ref={form}>
            {consent ? (
              <fieldset className="flex flex-col gap-2 rounded-lg border border-slate-200 bg-white p-4">
                <legend className="px-1 font-semibold">Research use of your choices</legend>
                <p className="text-sm text-slate-700">
                  Your instructor may use the class’s choices, without names, for research approved by the institution’s ethics board.
                  Your answer does not change your points or your grade.
                </p>
                <label className="flex min-h-12 items-center gap-3">
                  <input type="radio" name="consent" value="yes" defaultChecked={answered === 'yes'} className="size-5" /> Yes, my choices may be used for research
                </label>
                <label className="flex min-h-12 items-center gap-3">
                  <input type="radio" name="consent" value="no" defaultChecked={answered === 'no'} className="size-5" /> No, leave my choices out of research
                </label>
                {actionData?.field === 'consent' ? <FieldError>{actionData.error}</FieldError> : null}
              </fieldset>
            ) : null}
            {actionData?.error && actionData.field === null ? <Notice tone="error">{actionData.error}</Notice> : null}
            <Button type="submit" disabled={busy} className="min-h-16 text-xl">
              {busy ? 'Joining…' : 'I have read this — join'}
            </Button>
          </Form>
        </>
      )}
    </ParticipantShell>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Session ${data?.code ?? ''} · Parley` }];
