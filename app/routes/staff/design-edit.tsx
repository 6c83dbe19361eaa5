import { useEffect, useMemo, useRef, useState } from 'react';
import { data, Form, Link, redirect, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/design-edit';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { StrategyChecker } from '#app/components/strategy-checker';
import { TheoryPanel, type TheoryDraft } from '#app/components/theory-panel';
import { Button, FieldError, Notice, SelectField, TextField } from '#app/components/ui';
import { LIBRARY } from '#app/lib/automata';
import { computerStrategyOf, DEFAULT_LABELS, type Design, type DesignInput, designSchema } from '#app/lib/design';
import {
  fillInstructions,
  generateInstructions,
  instructionContradictions,
  instructionsTemplate,
  PLACEHOLDER_HELP,
  PLACEHOLDERS,
  placeholderProblems,
  placeholderValues,
} from '#app/lib/instructions';
import { PhonePreview } from '#app/components/phone-preview';
import { treatmentOf } from '#app/lib/treatment';
import {
  createDesign,
  getDesign,
  laterVersions,
  listCourseStrategies,
  newDesignVersion,
  previousVersion,
  updateDesign,
} from '#app/models/design.server';
import { designInputFromForm } from '#app/utils/design-form';
import { fieldErrors } from '#app/utils/forms';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

const Name = z.string().trim().min(2, 'Name the design (at least 2 characters).').max(120, 'At most 120 characters.');

/** What a new design starts from: Dal Bó & Fréchette's (2011) payoffs with R = 40, δ = 3/4. */
const NEW_DESIGN: Design = designSchema.parse({
  payoffs: { R: 40, S: 12, T: 50, P: 25 },
  labels: DEFAULT_LABELS,
  delta: 0.75,
  supergames: 20,
  roundSeconds: 20,
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const courseStrategies = await listCourseStrategies(course.id);
  const url = new URL(request.url);
  const saved = url.searchParams.get('saved') === '1';
  const madeVersion = url.searchParams.get('version') === 'new';
  const isInstructor = role === 'instructor';
  if (!params.designId) {
    respondUnless(isInstructor, 403, 'Only instructors create designs.');
    return { course, design: null, name: '', params: NEW_DESIGN, canEdit: true, isInstructor, courseStrategies, saved, madeVersion };
  }
  const design = await getDesign(course.id, parseId(params.designId, 'design'));
  respondUnless(design, 404, 'No such design in this course.');
  const [previous, later] = await Promise.all([previousVersion(course.id, design), laterVersions(course.id, design.id)]);
  return {
    course,
    design: {
      id: design.id,
      archived: design.archivedAt !== null,
      version: design.version,
      previous,
      later,
      sessionCount: design.sessionCount,
      treatment: treatmentOf(design.params).label,
    },
    name: design.name,
    params: design.params,
    canEdit: isInstructor && design.archivedAt === null && design.sessionCount === 0,
    isInstructor,
    courseStrategies,
    saved,
    madeVersion,
  };
}

const usedMessage = (n: number) =>
  `This design was used by ${n === 1 ? 'a session' : `${n} sessions`}, so it stays as they ran it and cannot be changed. Make a new version to change it.`;

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  const form = await request.formData();
  if (form.get('intent') === 'new-version') {
    respondUnless(params.designId, 400, 'Save the design first.');
    const id = await newDesignVersion(course.id, parseId(params.designId, 'design'), user.id);
    respondUnless(id, 404, 'No such design in this course.');
    throw redirect(`/courses/${course.id}/designs/${id}?version=new`);
  }
  const values = Object.fromEntries([...form].map(([k, v]) => [k, String(v)]));
  const name = Name.safeParse(form.get('name'));
  const input = designInputFromForm(form);
  const parsed = designSchema.safeParse(input);
  if (!name.success || !parsed.success) {
    const errors = {
      ...(parsed.success ? {} : fieldErrors(parsed.error)),
      ...(name.success ? {} : { name: name.error.issues[0].message }),
    };
    return data({ ok: false as const, errors, values, message: 'Some fields need attention; nothing was saved.' }, { status: 400 });
  }
  // A placeholder the design cannot fill would reach the phones as "{name}": refused beside the text.
  const unknown = placeholderProblems(parsed.data, parsed.data.instructions);
  if (unknown.length)
    return data(
      {
        ok: false as const,
        errors: { instructions: unknown.join(' ') },
        values,
        message: 'Some fields need attention; nothing was saved.',
      },
      { status: 400 },
    );
  // Stored as a template, so the numbers follow the parameters when they change later.
  const params_ = parsed.data.instructions.trim() ? parsed.data : { ...parsed.data, instructions: instructionsTemplate(parsed.data) };
  if (!params.designId) {
    const id = await createDesign(course.id, user.id, name.data, params_);
    throw redirect(`/courses/${course.id}/designs/${id}?saved=1`);
  }
  const designId = parseId(params.designId, 'design');
  const existing = await getDesign(course.id, designId);
  respondUnless(existing, 404, 'No such design in this course.');
  if (existing.archivedAt)
    return data(
      { ok: false as const, errors: {}, values, message: 'This design is archived; restore it before editing.' },
      { status: 409 },
    );
  if (existing.sessionCount > 0)
    return data({ ok: false as const, errors: {}, values, message: usedMessage(existing.sessionCount) }, { status: 409 });
  // false: a session opened from it (or it was archived) since it was read above
  if (!(await updateDesign(course.id, designId, name.data, params_))) {
    return data(
      {
        ok: false as const,
        errors: {},
        values,
        message: 'This design was used by a session or archived a moment ago; nothing was saved. Make a new version to change it.',
      },
      { status: 409 },
    );
  }
  return { ok: true as const, errors: {}, values: null, message: 'Design saved.' };
}

function draftFrom(input: DesignInput): TheoryDraft {
  return {
    game: input.payoffs,
    delta: input.delta,
    supergames: input.supergames,
    roundSeconds: input.roundSeconds,
    termination: input.termination ?? { kind: 'standard' },
  };
}

/** Stored design → the flat field values of the form. */
function formValues(name: string, d: Design): Record<string, string> {
  const v: Record<string, string> = {
    name,
    'payoffs.R': String(d.payoffs.R),
    'payoffs.S': String(d.payoffs.S),
    'payoffs.T': String(d.payoffs.T),
    'payoffs.P': String(d.payoffs.P),
    'labels.C': d.labels.C,
    'labels.D': d.labels.D,
    delta: String(d.delta),
    supergames: String(d.supergames),
    roundSeconds: String(d.roundSeconds),
    'termination.kind': d.termination.kind,
    'termination.k': d.termination.kind === 'block' ? String(d.termination.k) : '5',
    'oddCount.kind': d.oddCount.kind,
    'oddCount.strategy': computerStrategyOf(d),
    timeout: d.timeout,
    'credit.kind': d.credit.kind,
    consent: d.consent ? 'on' : '',
    comprehension: d.comprehension ? 'on' : '',
    practice: d.practice ? 'on' : '',
    instructions: d.instructions,
  };
  if (d.credit.kind === 'participation') {
    v['credit.credit'] = String(d.credit.credit);
    v['credit.pointsScaleMax'] = d.credit.pointsScaleMax ? String(d.credit.pointsScaleMax) : '';
  } else {
    Object.assign(v, {
      'credit.showUpFee': String(d.credit.showUpFee),
      'credit.ratePerPoint': String(d.credit.ratePerPoint),
      'credit.currency': d.credit.currency,
      'credit.rounding': String(d.credit.rounding),
    });
  }
  return v;
}

export default function DesignEditor({ loaderData, actionData }: Route.ComponentProps) {
  const { course, design, canEdit, isInstructor, courseStrategies } = loaderData;
  const initial = useMemo(() => formValues(loaderData.name, loaderData.params), [loaderData.name, loaderData.params]);
  const values: Record<string, string> = actionData && !actionData.ok && actionData.values ? actionData.values : initial;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const formRef = useRef<HTMLFormElement>(null);
  const [input, setInput] = useState<DesignInput>(() => designInputFromForm(new Map(Object.entries(values))));
  // Stored instructions that equal what the parameters generate (as text, from before templates,
  // or as the template) keep following the parameters.
  const [instructionsEdited, setInstructionsEdited] = useState(() => {
    const stored = values.instructions.trim();
    return (
      stored !== '' &&
      stored !== generateInstructions(loaderData.params).trim() &&
      stored !== instructionsTemplate(loaderData.params).trim()
    );
  });
  const [instructions, setInstructions] = useState(values.instructions);
  const [creditKind, setCreditKind] = useState(values['credit.kind'] ?? 'participation');
  const [oddKind, setOddKind] = useState(values['oddCount.kind'] ?? 'computer');
  const [termKind, setTermKind] = useState(values['termination.kind'] ?? 'standard');
  const busy = useNavigation().state === 'submitting';

  const parsed = designSchema.safeParse(input);
  const generated = parsed.success ? instructionsTemplate(parsed.data) : '';
  const shownInstructions = instructionsEdited ? instructions : generated;
  const draft = draftFrom(input);
  const filled = parsed.success ? placeholderValues(parsed.data) : null;
  const contradictions = parsed.success
    ? [
        ...placeholderProblems(parsed.data, shownInstructions),
        ...instructionContradictions(parsed.data, fillInstructions(parsed.data, shownInstructions)),
      ]
    : [];
  const game = parsed.success ? parsed.data.payoffs : null;
  const saved = loaderData.saved && !actionData;
  const madeVersion = loaderData.madeVersion && !actionData && design;
  const used = design !== null && design.sessionCount > 0;

  // δ is checked as it is typed (the same rule as the save), so 1.2 is refused beside the field
  // at once; an empty field waits for the save, which says "δ must be a number".
  const deltaCheck = input.delta === undefined ? null : designSchema.shape.delta.safeParse(input.delta);
  const deltaError = deltaCheck ? (deltaCheck.success ? undefined : deltaCheck.error.issues[0].message) : errors.delta;

  // After a refused save the page would stay where the button was, the errors out of sight and
  // the theory panel stuck halfway down: bring the first field in error to the middle and focus it.
  useEffect(() => {
    if (!actionData || actionData.ok) return;
    const first = formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]');
    if (!first) return;
    first.scrollIntoView({ block: 'center' });
    first.focus({ preventScroll: true });
  }, [actionData]);

  const onChange = () => {
    if (formRef.current) setInput(designInputFromForm(new FormData(formRef.current)));
  };
  const labelC = input.labels?.C || 'X';
  const labelD = input.labels?.D || 'Y';
  const payoffCell = (field: 'R' | 'S' | 'T' | 'P', words: string, partnerGets: string) => (
    <div className="flex min-w-0 flex-col gap-1">
      <label htmlFor={`payoffs-${field}`} className="text-sm font-semibold">
        {field} <span className="font-normal text-slate-600">— {words}</span>
      </label>
      <input
        id={`payoffs-${field}`}
        name={`payoffs.${field}`}
        inputMode="decimal"
        defaultValue={values[`payoffs.${field}`]}
        readOnly={!canEdit}
        aria-invalid={errors[`payoffs.${field}`] ? true : undefined}
        aria-describedby={errors[`payoffs.${field}`] ? `payoffs-${field}-error` : undefined}
        className="num min-h-11 w-full rounded-lg border border-slate-300 bg-white px-3 text-right text-lg"
      />
      <span className="text-xs text-slate-600">partner gets {partnerGets}</span>
      {errors[`payoffs.${field}`] ? <FieldError id={`payoffs-${field}-error`}>{errors[`payoffs.${field}`]}</FieldError> : null}
    </div>
  );
  const num = (k: keyof NonNullable<DesignInput['payoffs']>) => {
    const v = input.payoffs?.[k];
    return typeof v === 'number' && Number.isFinite(v) ? String(v) : '…';
  };

  return (
    <>
      <PageHeader
        title={design ? loaderData.name : 'New design'}
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/designs`, label: 'Designs' }]} />}
      >
        {design && design.version > 1 ? (
          <p className="text-slate-700" data-testid="design-version">
            v{design.version} of{' '}
            {design.previous ? (
              <Link
                to={`/courses/${course.id}/designs/${design.previous.id}`}
                className="font-semibold text-accent-700 underline-offset-4 hover:underline"
              >
                {design.previous.name} (v{design.previous.version})
              </Link>
            ) : (
              'an earlier design'
            )}
          </p>
        ) : null}
      </PageHeader>
      <div className="mb-4 flex flex-col gap-2" aria-live="polite">
        {actionData ? <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice> : null}
        {saved ? <Notice tone="ok">Design saved.</Notice> : null}
        {madeVersion ? (
          <Notice tone="ok">
            New version v{design.version} made. Change it and save; sessions of the earlier version keep what they ran.
          </Notice>
        ) : null}
        {design?.archived ? <Notice tone="info">This design is archived and read-only. Restore it from the list to edit it.</Notice> : null}
        {used && !design.archived ? (
          <Notice tone="info" title="Read-only: used by a session">
            <span data-testid="read-only-reason">
              {design.sessionCount === 1 ? 'A session was' : `${design.sessionCount} sessions were`} opened from this design, so it stays
              exactly as they ran it (treatment {design.treatment}).
              {isInstructor ? ' To change it, make a new version: a copy you can edit, linked to this one.' : ''}
            </span>
            {isInstructor ? (
              <Form method="post" className="mt-3">
                <input type="hidden" name="intent" value="new-version" />
                <Button type="submit" variant="secondary" disabled={busy}>
                  Make a new version
                </Button>
              </Form>
            ) : null}
            {design.later.length > 0 ? (
              <p className="mt-2 text-sm">
                Newer:{' '}
                {design.later.map((v, i) => (
                  <span key={v.id}>
                    {i > 0 ? ', ' : ''}
                    <Link
                      to={`/courses/${course.id}/designs/${v.id}`}
                      className="font-semibold text-accent-700 underline-offset-4 hover:underline"
                    >
                      {v.name} (v{v.version})
                    </Link>
                  </span>
                ))}
              </p>
            ) : null}
          </Notice>
        ) : null}
        {!isInstructor && !design?.archived && !used ? (
          <Notice tone="info">You can look at this design; only the course’s instructors change it.</Notice>
        ) : null}
      </div>
      <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,30rem)]">
        <Form method="post" ref={formRef} onChange={onChange} className="flex min-w-0 flex-col gap-6" noValidate>
          <fieldset disabled={!canEdit} className="contents">
            <TextField
              label="Name"
              name="name"
              defaultValue={values.name}
              error={errors.name}
              hint="Exports show the name as the treatment; Parley tells treatments apart by payoffs, δ and termination, not by name."
            />

            <section aria-labelledby="payoffs-title" className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4">
              <h2 id="payoffs-title" className="text-lg font-semibold">
                Payoffs and labels
              </h2>
              <p className="text-sm text-slate-600">
                Points per round, as participants will see them. A prisoner’s dilemma needs T &gt; R &gt; P &gt; S.
              </p>
              <div className="grid grid-cols-[auto_minmax(0,1fr)_minmax(0,1fr)] items-start gap-x-3 gap-y-3">
                <span />
                <span className="text-center text-sm font-semibold text-slate-700">Partner chooses {labelC}</span>
                <span className="text-center text-sm font-semibold text-slate-700">Partner chooses {labelD}</span>
                <span className="pt-8 text-sm font-semibold text-slate-700">You choose {labelC}</span>
                {payoffCell('R', `both choose ${labelC}`, num('R'))}
                {payoffCell('S', `only you choose ${labelC}`, num('T'))}
                <span className="pt-8 text-sm font-semibold text-slate-700">You choose {labelD}</span>
                {payoffCell('T', `only you choose ${labelD}`, num('S'))}
                {payoffCell('P', `both choose ${labelD}`, num('P'))}
              </div>
              <div className="grid gap-3 sm:grid-cols-2">
                <TextField
                  label="Label of the first action (C)"
                  name="labels.C"
                  defaultValue={values['labels.C']}
                  error={errors['labels.C'] ?? errors.labels}
                  hint="Neutral words; the default X and Y carry no meaning."
                />
                <TextField
                  label="Label of the second action (D)"
                  name="labels.D"
                  defaultValue={values['labels.D']}
                  error={errors['labels.D']}
                />
              </div>
            </section>

            <section aria-labelledby="time-title" className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4">
              <h2 id="time-title" className="text-lg font-semibold">
                Continuation and time
              </h2>
              <div className="grid gap-3 sm:grid-cols-3">
                <TextField
                  label="δ (chance of another round)"
                  name="delta"
                  inputMode="decimal"
                  defaultValue={values.delta}
                  error={deltaError}
                  hint="Between 0 and 1, e.g. 0.75."
                />
                <TextField
                  label="Supergames"
                  name="supergames"
                  inputMode="numeric"
                  defaultValue={values.supergames}
                  error={errors.supergames}
                />
                <TextField
                  label="Round timer (seconds)"
                  name="roundSeconds"
                  inputMode="numeric"
                  defaultValue={values.roundSeconds}
                  error={errors.roundSeconds}
                />
              </div>
              <input
                type="range"
                min={0.01}
                max={0.99}
                step={0.01}
                aria-label="δ slider"
                value={typeof input.delta === 'number' && input.delta > 0 && input.delta < 1 ? input.delta : 0.5}
                onChange={(e) => {
                  const el = formRef.current?.elements.namedItem('delta');
                  if (el instanceof HTMLInputElement) el.value = e.target.value;
                  onChange();
                }}
                className="w-full accent-accent-700"
              />
              <fieldset className="flex flex-col gap-2">
                <legend className="font-semibold">Termination</legend>
                <label className="flex min-h-11 items-center gap-2">
                  <input
                    type="radio"
                    name="termination.kind"
                    value="standard"
                    checked={termKind === 'standard'}
                    onChange={() => setTermKind('standard')}
                  />{' '}
                  Standard: a draw after every round, shown at once
                </label>
                <label className="flex min-h-11 items-center gap-2">
                  <input
                    type="radio"
                    name="termination.kind"
                    value="block"
                    checked={termKind === 'block'}
                    onChange={() => setTermKind('block')}
                  />{' '}
                  Blocks of rounds, the end revealed after each block (Fréchette &amp; Yuksel 2017)
                </label>
                {termKind === 'block' ? (
                  <TextField
                    label="Rounds per block"
                    name="termination.k"
                    inputMode="numeric"
                    defaultValue={values['termination.k']}
                    error={errors['termination.k']}
                    className="max-w-48"
                  />
                ) : null}
              </fieldset>
              <p className="text-sm text-slate-700">
                Matching: random re-matching between supergames, avoiding earlier partners while possible.
              </p>
            </section>

            <section aria-labelledby="rules-title" className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4">
              <h2 id="rules-title" className="text-lg font-semibold">
                Rules
              </h2>
              <fieldset className="flex flex-col gap-2">
                <legend className="font-semibold">Odd head-count</legend>
                <label className="flex min-h-11 items-center gap-2">
                  <input
                    type="radio"
                    name="oddCount.kind"
                    value="computer"
                    checked={oddKind === 'computer'}
                    onChange={() => setOddKind('computer')}
                  />{' '}
                  A disclosed computer partner, in turn
                </label>
                <label className="flex min-h-11 items-center gap-2">
                  <input
                    type="radio"
                    name="oddCount.kind"
                    value="sit-out"
                    checked={oddKind === 'sit-out'}
                    onChange={() => setOddKind('sit-out')}
                  />{' '}
                  One participant sits out, in turn
                </label>
                {oddKind === 'computer' ? (
                  <SelectField
                    label="The computer partner plays"
                    name="oddCount.strategy"
                    defaultValue={values['oddCount.strategy']}
                    error={errors['oddCount.strategy']}
                    options={LIBRARY.map((a) => ({ value: a.id, label: `${a.id} — ${a.name}` }))}
                    className="max-w-md"
                  />
                ) : null}
              </fieldset>
              <SelectField
                label="When a participant does not choose in time"
                name="timeout"
                defaultValue={values.timeout}
                error={errors.timeout}
                className="max-w-md"
                options={[
                  { value: 'repeat-last', label: `Repeat their last choice (${labelC} in round 1)` },
                  { value: 'defect', label: `Choose ${labelD}` },
                  { value: 'cooperate', label: `Choose ${labelC}` },
                  { value: 'computer-strategy', label: 'Play the computer partner’s strategy' },
                ]}
              />
              <fieldset className="flex flex-col gap-2">
                <legend className="font-semibold">Credit</legend>
                <label className="flex min-h-11 items-center gap-2">
                  <input
                    type="radio"
                    name="credit.kind"
                    value="participation"
                    checked={creditKind === 'participation'}
                    onChange={() => setCreditKind('participation')}
                  />{' '}
                  Course credit
                </label>
                <label className="flex min-h-11 items-center gap-2">
                  <input
                    type="radio"
                    name="credit.kind"
                    value="paid"
                    checked={creditKind === 'paid'}
                    onChange={() => setCreditKind('paid')}
                  />{' '}
                  Paid session
                </label>
                {creditKind === 'participation' ? (
                  <div className="grid gap-3 sm:grid-cols-2">
                    <TextField
                      label="Credit for taking part"
                      name="credit.credit"
                      inputMode="decimal"
                      defaultValue={values['credit.credit'] ?? '1'}
                      error={errors['credit.credit']}
                    />
                    <TextField
                      label="Points for full credit (optional)"
                      name="credit.pointsScaleMax"
                      inputMode="decimal"
                      defaultValue={values['credit.pointsScaleMax']}
                      error={errors['credit.pointsScaleMax']}
                      hint="Empty: taking part earns the full credit."
                    />
                  </div>
                ) : (
                  <>
                    <div className="grid gap-3 sm:grid-cols-4">
                      <TextField
                        label="Show-up fee"
                        name="credit.showUpFee"
                        inputMode="decimal"
                        defaultValue={values['credit.showUpFee'] ?? '5'}
                        error={errors['credit.showUpFee']}
                      />
                      <TextField
                        label="Per point"
                        name="credit.ratePerPoint"
                        inputMode="decimal"
                        defaultValue={values['credit.ratePerPoint'] ?? '0.01'}
                        error={errors['credit.ratePerPoint']}
                      />
                      <TextField
                        label="Currency"
                        name="credit.currency"
                        defaultValue={values['credit.currency'] ?? 'EUR'}
                        error={errors['credit.currency']}
                        maxLength={3}
                      />
                      <TextField
                        label="Round up to"
                        name="credit.rounding"
                        inputMode="decimal"
                        defaultValue={values['credit.rounding'] ?? '0.01'}
                        error={errors['credit.rounding']}
                      />
                    </div>
                    <p className="text-sm text-slate-600">Paid sessions follow your institution’s payment rules; nobody can lose money.</p>
                  </>
                )}
              </fieldset>
              <label className="flex min-h-11 items-center gap-2">
                <input type="checkbox" name="consent" defaultChecked={values.consent === 'on'} /> Ask participants for consent to research
                use before they play
              </label>
              <p className="text-sm text-slate-600">
                Research use of classroom data needs your institution’s ethics-board approval and the participants’ informed consent; grades
                must not depend on it.
              </p>
              <fieldset className="flex flex-col gap-1">
                <legend className="font-semibold">Before play</legend>
                <label className="flex min-h-11 items-center gap-2">
                  <input type="checkbox" name="comprehension" defaultChecked={values.comprehension === 'on'} /> Comprehension check: three
                  questions on the points table and the draw rule, answered correctly before the lobby
                </label>
                <label className="flex min-h-11 items-center gap-2">
                  <input type="checkbox" name="practice" defaultChecked={values.practice === 'on'} /> Practice supergame against the
                  computer, on the phone, not recorded
                </label>
                <p className="text-sm text-slate-600">
                  Neither changes the treatment: sessions with and without them are pooled in the Debrief.
                </p>
              </fieldset>
            </section>

            <section aria-labelledby="instructions-title" className="flex flex-col gap-2 rounded-lg border border-slate-200 bg-white p-4">
              <div className="flex flex-wrap items-center justify-between gap-2">
                <h2 id="instructions-title" className="text-lg font-semibold">
                  Instructions
                </h2>
                {instructionsEdited && canEdit ? (
                  <Button type="button" variant="quiet" onClick={() => setInstructionsEdited(false)}>
                    Write them again from the parameters
                  </Button>
                ) : null}
              </div>
              <p className="text-sm text-slate-600">
                {instructionsEdited
                  ? 'Edited by hand. Numbers written as {placeholders} still follow the parameters; numbers typed in do not.'
                  : 'Written from the parameters above; edit the words freely — the {placeholders} are filled with the parameters when a phone shows them.'}
              </p>
              <label htmlFor="instructions" className="sr-only">
                Instructions participants read
              </label>
              <textarea
                id="instructions"
                name="instructions"
                rows={14}
                value={shownInstructions}
                onChange={(e) => {
                  setInstructions(e.target.value);
                  setInstructionsEdited(true);
                }}
                className="rounded-lg border border-slate-300 bg-white p-3 text-sm leading-relaxed"
              />
              {errors.instructions ? <FieldError>{errors.instructions}</FieldError> : null}
              {contradictions.length ? (
                <div
                  role="alert"
                  className="rounded-md border border-red-300 bg-red-50 p-3 text-sm text-red-900"
                  data-testid="instruction-contradictions"
                >
                  <p className="font-semibold">
                    <span aria-hidden="true">✕ </span>These instructions contradict the design; a session cannot be opened from it until
                    they agree.
                  </p>
                  <ul className="mt-1 list-disc pl-5">
                    {contradictions.map((c) => (
                      <li key={c}>{c}</li>
                    ))}
                  </ul>
                </div>
              ) : null}
              <details className="text-sm">
                <summary className="min-h-11 cursor-pointer content-center font-semibold text-accent-700">
                  Placeholders: write a name in curly braces, e.g. {'{delta%}'}
                </summary>
                <table className="mt-1 w-full text-left">
                  <caption className="sr-only">Placeholders and what they are filled with</caption>
                  <thead className="text-slate-600">
                    <tr>
                      <th scope="col" className="py-1 pr-3 font-semibold">
                        Write
                      </th>
                      <th scope="col" className="py-1 pr-3 font-semibold">
                        Filled with
                      </th>
                      <th scope="col" className="py-1 font-semibold">
                        Now
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {PLACEHOLDERS.map((k) => (
                      <tr key={k} className="border-t border-slate-100">
                        <td className="py-1 pr-3 font-mono">{`{${k}}`}</td>
                        <td className="py-1 pr-3">{PLACEHOLDER_HELP[k]}</td>
                        <td className="num py-1">{filled?.[k] ?? '—'}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </details>
            </section>
          </fieldset>
          {/* Outside the fieldset: someone who may only look at the design still switches the preview's tabs and scrolls it. */}
          <PhonePreview design={parsed.success ? parsed.data : null} text={shownInstructions} course={course.title} />
          {canEdit ? (
            <div className="flex gap-3">
              <Button type="submit" disabled={busy}>
                {busy ? 'Saving…' : design ? 'Save design' : 'Create design'}
              </Button>
            </div>
          ) : null}
        </Form>
        <div className="flex min-w-0 flex-col gap-6 lg:sticky lg:top-4 lg:self-start">
          <TheoryPanel draft={draft} />
          <StrategyChecker
            game={game}
            delta={parsed.success ? parsed.data.delta : null}
            courseStrategies={courseStrategies}
            saveAction={`/courses/${course.id}/strategies`}
            canSave={canEdit}
          />
        </div>
      </div>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.name || 'New design'} · Designs · Parley` }];
