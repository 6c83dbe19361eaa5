// A new strategy league: title, payoffs (Axelrod's by default, or a course design's), δ, ε,
// simulated matches, generations, deadline. Field errors beside the fields; a warning where δ is
// too low for cooperation to be sustained.
import { useEffect, useRef, useState } from 'react';
import { data, Form, redirect, useNavigation } from 'react-router';
import type { Route } from './+types/league-new';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, Notice, SelectField, TextField } from '#app/components/ui';
import { LEAGUE_MAX_GENERATIONS, LEAGUE_MAX_MATCHES } from '#app/lib/league-design';
import { listDesigns } from '#app/models/design.server';
import { createLeague } from '#app/models/league.server';
import { deltaWarning, NEW_LEAGUE, readLeagueForm } from '#app/utils/league-form';
import { requireCourseRole } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor']);
  const designs = await listDesigns(course.id);
  return {
    course,
    designs: designs
      .filter((d) => d.archivedAt === null)
      .map((d) => ({
        id: d.id,
        name: d.version > 1 ? `${d.name} (v${d.version})` : d.name,
        payoffs: d.params.payoffs,
        delta: d.params.delta,
      })),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  const form = await request.formData();
  const values = Object.fromEntries([...form].map(([k, v]) => [k, String(v).slice(0, 200)]));
  const read = readLeagueForm(form);
  if (!read.ok) return data({ errors: read.errors, values }, { status: 400 });
  const league = await createLeague(course.id, user.id, { title: read.title, design: read.design, deadline: read.deadline });
  throw redirect(`/courses/${course.id}/leagues/${league.id}?created=1`);
}

const initialValues: Record<string, string> = {
  title: '',
  'payoffs.R': String(NEW_LEAGUE.payoffs.R),
  'payoffs.S': String(NEW_LEAGUE.payoffs.S),
  'payoffs.T': String(NEW_LEAGUE.payoffs.T),
  'payoffs.P': String(NEW_LEAGUE.payoffs.P),
  delta: String(NEW_LEAGUE.delta),
  epsilon: String(NEW_LEAGUE.epsilon),
  matches: String(NEW_LEAGUE.matches),
  generations: String(NEW_LEAGUE.generations),
  seed: String(NEW_LEAGUE.seed),
  deadline: '',
};

export default function NewLeague({ loaderData, actionData }: Route.ComponentProps) {
  const { course, designs } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const [values, setValues] = useState<Record<string, string>>(actionData?.values ?? initialValues);
  const [tz, setTz] = useState('0');
  const busy = useNavigation().state === 'submitting';
  const formRef = useRef<HTMLFormElement>(null);
  // the deadline is typed in the browser's time zone; the server is told which
  useEffect(() => setTz(String(new Date().getTimezoneOffset())), []);
  useEffect(() => {
    if (!actionData) return;
    formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  }, [actionData]);

  const n = (k: string) => Number(values[k]);
  const warning = deltaWarning({
    payoffs: { R: n('payoffs.R'), S: n('payoffs.S'), T: n('payoffs.T'), P: n('payoffs.P') },
    delta: n('delta'),
  });
  const set = (k: string) => (e: React.ChangeEvent<HTMLInputElement>) => setValues((v) => ({ ...v, [k]: e.target.value }));
  const field = (k: string, label: string, extra: Partial<React.ComponentProps<typeof TextField>> = {}) => (
    <TextField name={k} label={label} value={values[k] ?? ''} onChange={set(k)} error={errors[k]} inputMode="decimal" {...extra} />
  );
  const fromDesign = (id: string) => {
    if (id === 'axelrod') {
      setValues((v) => ({ ...v, 'payoffs.R': '3', 'payoffs.S': '0', 'payoffs.T': '5', 'payoffs.P': '1' }));
      return;
    }
    const d = designs.find((x) => String(x.id) === id);
    if (d)
      setValues((v) => ({
        ...v,
        'payoffs.R': String(d.payoffs.R),
        'payoffs.S': String(d.payoffs.S),
        'payoffs.T': String(d.payoffs.T),
        'payoffs.P': String(d.payoffs.P),
        delta: String(d.delta),
      }));
  };

  return (
    <>
      <PageHeader
        title="New strategy league"
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/leagues`, label: 'Strategy leagues' }]} />}
      />
      <Form method="post" ref={formRef} className="flex max-w-3xl flex-col gap-6" noValidate>
        {actionData ? (
          <Notice tone="error" title="Some fields need attention">
            Nothing was saved.
          </Notice>
        ) : null}
        <TextField name="title" label="Title" value={values.title} onChange={set('title')} error={errors.title} required maxLength={120} />

        <fieldset className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4">
          <legend className="px-1 font-semibold">Payoffs per round</legend>
          <SelectField
            label="Start from"
            defaultValue="axelrod"
            onChange={(e) => fromDesign(e.target.value)}
            options={[
              { value: 'axelrod', label: 'Axelrod’s tournament: R 3, S 0, T 5, P 1' },
              ...designs.map((d) => ({
                value: String(d.id),
                label: `Design “${d.name}”: R ${d.payoffs.R}, S ${d.payoffs.S}, T ${d.payoffs.T}, P ${d.payoffs.P}, δ ${d.delta}`,
              })),
            ]}
          />
          <div className="grid grid-cols-2 items-end gap-3 sm:grid-cols-4">
            {field('payoffs.R', 'R — both cooperate')}
            {field('payoffs.S', 'S — cooperate, partner defects')}
            {field('payoffs.T', 'T — defect, partner cooperates')}
            {field('payoffs.P', 'P — both defect')}
          </div>
          {errors.payoffs ? <Notice tone="error">{errors.payoffs}</Notice> : null}
        </fieldset>

        <fieldset className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4">
          <legend className="px-1 font-semibold">Matches</legend>
          <div className="grid gap-3 sm:grid-cols-2">
            {field('delta', 'δ — chance of another round', { hint: 'A supergame lasts 1/(1 − δ) rounds on average.' })}
            {field('epsilon', 'ε — execution error', { hint: 'Each intended action is flipped with this probability (0 for none).' })}
          </div>
          {warning ? (
            <Notice tone="warn" title="Cooperation cannot be sustained at this δ">
              {warning}
            </Notice>
          ) : null}
          <div className="grid gap-3 sm:grid-cols-3">
            {field('matches', 'Simulated matches per pair', {
              inputMode: 'numeric',
              hint: `0 for exact values only; 2–${LEAGUE_MAX_MATCHES} to show the luck of a played tournament beside them.`,
            })}
            {field('generations', 'Generations of evolution', { inputMode: 'numeric', hint: `1–${LEAGUE_MAX_GENERATIONS}` })}
            {field('seed', 'Seed of the simulation', { inputMode: 'numeric', hint: 'The same seed gives the same simulated results.' })}
          </div>
        </fieldset>

        <fieldset className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4">
          <legend className="px-1 font-semibold">Entries</legend>
          <TextField
            name="deadline"
            type="datetime-local"
            label="Deadline for entries (optional)"
            value={values.deadline ?? ''}
            onChange={set('deadline')}
            error={errors.deadline}
            hint="In your time zone. Leave it empty to take entries until you close the league."
          />
          <input type="hidden" name="tz" value={tz} />
        </fieldset>
        <div>
          <Button type="submit" disabled={busy}>
            {busy ? 'Creating…' : 'Create league'}
          </Button>
        </div>
      </Form>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `New strategy league · ${data?.course.title ?? 'Course'} · Parley` }];
