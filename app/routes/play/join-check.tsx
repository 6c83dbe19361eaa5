// The comprehension check (design option `comprehension`): between the instructions and the lobby.
// Plain form posts, so it works before hydration and without JavaScript; a wrong answer is
// explained beside its question and the phone tries again. Attempts are stored for the Conductor.
import { data, Form, Link, redirect, useNavigation } from 'react-router';
import type { Route } from './+types/join-check';
import { PayoffTable } from '#app/components/live/payoff-table';
import { ParticipantShell } from '#app/components/shells';
import { Button, Notice } from '#app/components/ui';
import { comprehensionQuestions, gradeAnswers } from '#app/lib/comprehension';
import { payoffRows } from '#app/lib/instructions';
import { markCheckShown, recordAttempt } from '#app/models/comprehension.server';
import { requireUser } from '#app/utils/auth.server';
import { admission, carriedConsent, joinNow, nextStep, sendJoinedToPlay } from '#app/utils/join.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const code = params.code.toUpperCase();
  const { session, refusal } = await admission(code, user);
  // Refusals, and sessions without a check, are the instructions page's to explain.
  if (refusal || !session.design.comprehension) throw redirect(`/join/${code}`);
  await sendJoinedToPlay(session, user);
  const consent = carriedConsent(session.design, new URL(request.url).searchParams.get('consent'));
  if (consent === 'missing') throw redirect(`/join/${code}`);
  await markCheckShown(session.id, user.id);
  const d = session.design;
  return {
    code,
    email: user.email,
    consent,
    practiceNext: d.practice,
    // The answers stay on the server: the page gets the questions and options only.
    questions: comprehensionQuestions(d).map(({ id, text, options }) => ({ id, text, options })),
    labels: d.labels,
    table: payoffRows(d.payoffs),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const code = params.code.toUpperCase();
  const { session, refusal } = await admission(code, user);
  if (refusal || !session.design.comprehension) throw redirect(`/join/${code}`);
  const form = await request.formData();
  const consent = carriedConsent(session.design, form.get('consent'));
  if (consent === 'missing') throw redirect(`/join/${code}`);
  const questions = comprehensionQuestions(session.design);
  const answers: Record<string, string> = {};
  for (const q of questions) {
    const a = form.get(q.id);
    if (typeof a === 'string') answers[q.id] = a.slice(0, 40);
  }
  const grade = gradeAnswers(questions, answers);
  await recordAttempt(session.id, user.id, grade.wrong);
  if (!grade.passed) {
    const explanations = Object.fromEntries(
      questions.filter((q) => grade.wrong.includes(q.id)).map((q) => [q.id, answers[q.id] ? q.explanation : 'Choose an answer.']),
    );
    return data({ wrong: grade.wrong as string[], explanations, answers, error: null }, { status: 400 });
  }
  const next = await nextStep(code, session, user.id, consent, 'check');
  if (next) throw redirect(next);
  const { error } = await joinNow(session, user.id, consent);
  return data({ wrong: [] as string[], explanations: {} as Record<string, string>, answers, error }, { status: 409 });
}

export default function ComprehensionCheck({ loaderData, actionData }: Route.ComponentProps) {
  const { questions, consent, labels, table, code, practiceNext } = loaderData;
  const busy = useNavigation().state === 'submitting';
  const wrong = actionData?.wrong ?? [];
  return (
    <ParticipantShell email={loaderData.email}>
      <header className="flex flex-col gap-1">
        <h1 className="text-2xl font-semibold">Three questions before you play</h1>
        <p className="text-slate-700">
          They check that the rules are clear. They do not count for anything; answer all three correctly to go on.
        </p>
      </header>
      <PayoffTable table={table} labels={labels} />
      <div aria-live="polite">
        {wrong.length > 0 ? (
          <Notice tone="error" title={`${wrong.length === 1 ? 'One answer is' : `${wrong.length} answers are`} not right yet`}>
            Read why under the question, change your answer and send again.
          </Notice>
        ) : null}
        {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
      </div>
      <Form method="post" className="flex flex-col gap-5">
        {consent ? <input type="hidden" name="consent" value={consent} /> : null}
        {questions.map((q, i) => {
          const isWrong = wrong.includes(q.id);
          return (
            <fieldset
              key={q.id}
              className={`flex flex-col gap-1 rounded-lg border bg-white p-4 ${isWrong ? 'border-red-700' : 'border-slate-200'}`}
              aria-describedby={isWrong ? `${q.id}-why` : undefined}
              data-testid={`question-${q.id}`}
            >
              <legend className="px-1 text-lg leading-snug font-semibold">
                {i + 1}. {q.text}
              </legend>
              {q.options.map((o) => (
                <label key={o.value} className="flex min-h-12 items-center gap-3">
                  <input
                    type="radio"
                    name={q.id}
                    value={o.value}
                    defaultChecked={actionData?.answers[q.id] === o.value}
                    className="size-5 shrink-0"
                  />
                  {o.label}
                </label>
              ))}
              {isWrong ? (
                <p id={`${q.id}-why`} className="mt-1 rounded-md bg-red-50 p-3 text-red-900">
                  <span aria-hidden="true">✕ </span>
                  <strong>Not quite.</strong> {actionData?.explanations[q.id]}
                </p>
              ) : null}
            </fieldset>
          );
        })}
        <Button type="submit" disabled={busy} className="min-h-16 text-xl">
          {busy ? 'Checking…' : practiceNext ? 'Check my answers' : 'Check my answers and join'}
        </Button>
      </Form>
      <Link
        to={`/join/${code}`}
        className="min-h-11 content-center text-center font-semibold text-accent-700 underline-offset-4 hover:underline"
      >
        Read the rules again
      </Link>
    </ParticipantShell>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Three questions before you play · Parley' }];
