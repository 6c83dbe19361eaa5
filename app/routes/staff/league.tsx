// One strategy league: its settings, the entries (TanStack Table; house entries labelled), and
// the instructor's actions: add library strategies as house entries, remove an entry, close
// entries, reopen, run (a job, polled by a fetcher), publish and unpublish the results.
import { useEffect, useState } from 'react';
import { data, Form, Link, useFetcher, useNavigation, useRevalidator } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/league';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { LEAGUE_STATE_WORDS, LeagueStateBadge, RUN_STATUS_WORDS } from '#app/components/league-words';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, ButtonLink, Notice, RowAction, SelectField, TextField } from '#app/components/ui';
import { LIBRARY } from '#app/lib/automata';
import { LEAGUE_MAX_STATES } from '#app/lib/league';
import { LEAGUE_MAX_ENTRIES } from '#app/lib/league-design';
import { automatonCell, entryLabel } from '#app/lib/league-export';
import {
  acceptsEntries,
  addHouseEntry,
  getLeague,
  type LeagueChange,
  listEntries,
  removeEntry,
  setLeagueState,
  startLeagueRun,
  updateLeague,
} from '#app/models/league.server';
import type { loader as statusLoader } from '#app/routes/data/league-status';
import { formatDate } from '#app/utils/format';
import { deltaWarning, readDeadline } from '#app/utils/league-form';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const league = await getLeague(course.id, parseId(params.leagueId, 'league'));
  respondUnless(league, 404, 'No such league in this course.');
  const entries = await listEntries(league.id);
  // researchers never see participants' names (docs/security.md): their entries show as "Entry <id>"
  const showNames = role !== 'researcher';
  const created = new URL(request.url).searchParams.get('created') === '1';
  return {
    course,
    canEdit: role === 'instructor',
    // the projector reveal (routes/league-reveal.tsx) is for those who teach: not researchers
    canReveal: role === 'instructor' || role === 'assistant',
    created,
    league: {
      id: league.id,
      title: league.title,
      state: league.state,
      design: league.design,
      deadline: league.deadline,
      accepting: acceptsEntries(league),
      runStatus: league.runStatus,
      runError: league.runError,
      runAt: league.runAt,
      hasResults: league.results !== null,
      deltaWarning: deltaWarning(league.design),
    },
    entries: entries.map((e) => ({
      id: e.id,
      name: entryLabel({ entryId: e.id, name: e.name, house: e.house }, showNames),
      house: e.house,
      states: e.strategy.states.length,
      start: e.strategy.states[0].plays,
      automaton: automatonCell(e.strategy),
      updatedAt: e.updatedAt,
    })),
    library: LIBRARY.filter((a) => a.states.length <= LEAGUE_MAX_STATES).map((a) => ({ id: a.id, name: a.name })),
  };
}

const LeagueAction = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('add-house'), strategyId: z.string().max(24) }),
  z.object({ intent: z.literal('remove'), entryId: z.coerce.number().int().positive() }),
  z.object({ intent: z.enum(['close', 'reopen', 'run', 'publish', 'unpublish']) }),
  z.object({ intent: z.literal('deadline'), deadline: z.string().max(40), tz: z.string().max(10).optional() }),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor']);
  const leagueId = parseId(params.leagueId, 'league');
  const parsed = LeagueAction.safeParse(Object.fromEntries(await request.formData()));
  if (!parsed.success) return data({ ok: false, message: 'That request did not name an action on this league.' }, { status: 400 });
  const a = parsed.data;
  const answer = (r: LeagueChange | { ok: true } | { ok: false; message: string } | null, done: string) => {
    respondUnless(r, 404, 'No such league or entry in this course.');
    return r.ok ? { ok: true, message: done } : data({ ok: false, message: r.message }, { status: 409 });
  };
  switch (a.intent) {
    case 'deadline': {
      const read = readDeadline(new Map(Object.entries({ deadline: a.deadline, tz: a.tz ?? '0' })));
      if (!read.ok) return data({ ok: false, message: read.message }, { status: 400 });
      return answer(
        await updateLeague(course.id, leagueId, { deadline: read.deadline }),
        read.deadline ? 'Deadline changed.' : 'Deadline removed: entries are taken until you close the league.',
      );
    }
    case 'add-house':
      return answer(await addHouseEntry(course.id, leagueId, a.strategyId), 'House entry added.');
    case 'remove':
      return answer(await removeEntry(course.id, leagueId, a.entryId), 'Entry removed.');
    case 'close':
      return answer(
        await setLeagueState(course.id, leagueId, ['open'], 'closed'),
        'Entries are closed. Run the league when you are ready.',
      );
    case 'reopen':
      return answer(
        await setLeagueState(course.id, leagueId, ['closed', 'run'], 'open'),
        'The league takes entries again; results of an earlier run were set aside and a new run computes them.',
      );
    case 'run':
      return answer(await startLeagueRun(course.id, leagueId), 'The league is queued to run.');
    case 'publish':
      return answer(
        await setLeagueState(course.id, leagueId, ['run'], 'published'),
        'Published: participants of the course see the results.',
      );
    case 'unpublish':
      return answer(await setLeagueState(course.id, leagueId, ['published'], 'run'), 'Unpublished: only staff see the results.');
  }
}

type Row = Route.ComponentProps['loaderData']['entries'][number];

function columnsFor(canRemove: boolean) {
  const col = staffColumnHelper<Row>();
  return col.columns([
    col.accessor('name', { header: 'Entry', cell: (i) => <span className="font-semibold">{i.getValue()}</span> }),
    col.accessor((r) => (r.house ? 'House' : 'Participant'), {
      id: 'kind',
      header: 'Entered by',
      cell: (i) =>
        i.row.original.house ? (
          <span className="inline-block rounded border border-slate-300 bg-slate-50 px-1.5 py-0.5 text-sm font-semibold whitespace-nowrap">
            <span aria-hidden="true">⌂ </span>House
          </span>
        ) : (
          'Participant'
        ),
    }),
    col.accessor('states', { header: 'States', meta: { align: 'right' } }),
    col.accessor('start', { header: 'Starts with', meta: { align: 'right' } }),
    col.accessor('automaton', {
      header: 'Automaton (state: plays > next after CC, CD, DC, DD)',
      cell: (i) => <code className="text-sm whitespace-nowrap">{i.getValue()}</code>,
    }),
    col.accessor('updatedAt', { header: 'Changed', cell: (i) => formatDate(i.getValue()), sortFn: 'datetime' }),
    ...(canRemove
      ? [
          col.display({
            id: 'actions',
            header: () => <span className="sr-only">Actions</span>,
            cell: (i) => (
              <RowAction
                fields={{ intent: 'remove', entryId: i.row.original.id }}
                label="Remove"
                target={i.row.original.name}
                confirmText={`Remove the entry “${i.row.original.name}”?`}
              />
            ),
          }),
        ]
      : []),
  ]);
}

/** Change or remove the deadline (in the browser's time zone, as on the new-league form). */
function DeadlineForm() {
  const [tz, setTz] = useState('0');
  useEffect(() => setTz(String(new Date().getTimezoneOffset())), []);
  return (
    <Form method="post" className="flex flex-wrap items-end gap-2">
      <input type="hidden" name="intent" value="deadline" />
      <input type="hidden" name="tz" value={tz} />
      <TextField name="deadline" type="datetime-local" label="New deadline" hint="Empty: entries until you close the league." />
      <Button type="submit" variant="secondary">
        Set deadline
      </Button>
    </Form>
  );
}

function ActionButton({
  intent,
  children,
  variant = 'primary',
}: {
  intent: string;
  children: string;
  variant?: 'primary' | 'secondary' | 'danger';
}) {
  const busy = useNavigation().state === 'submitting';
  return (
    <Form method="post">
      <input type="hidden" name="intent" value={intent} />
      <Button type="submit" variant={variant} disabled={busy}>
        {children}
      </Button>
    </Form>
  );
}

/** Polls the run's status while it is queued or running; reloads the page's data when it ends. */
function RunStatus({
  courseId,
  leagueId,
  initial,
}: {
  courseId: number;
  leagueId: number;
  initial: Route.ComponentProps['loaderData']['league'];
}) {
  const poll = useFetcher<typeof statusLoader>();
  const { revalidate } = useRevalidator();
  const polled = poll.data && 'runStatus' in poll.data ? poll.data : null;
  const status = polled?.runStatus ?? initial.runStatus;
  const active = status === 'queued' || status === 'running';
  const { load, state } = poll;
  useEffect(() => {
    if (!active) return;
    const t = setInterval(() => {
      if (state === 'idle') void load(`/courses/${courseId}/leagues/${leagueId}/status`);
    }, 500);
    return () => clearInterval(t);
  }, [active, state, load, courseId, leagueId]);
  // the run ended while polling: the page's own data (state, results link) catches up
  useEffect(() => {
    if (polled && (polled.runStatus === 'done' || polled.runStatus === 'failed') && polled.runStatus !== initial.runStatus)
      void revalidate();
  }, [polled, initial.runStatus, revalidate]);
  const w = RUN_STATUS_WORDS[status];
  const error = polled?.error ?? initial.runError;
  return (
    <p className="flex flex-wrap items-center gap-2" aria-live="polite" data-testid="league-run-status" data-status={status}>
      <span className="font-semibold">Run:</span>
      <span aria-hidden="true">{w.icon}</span>
      {w.word}
      {status === 'running' && polled?.total ? <span className="text-slate-600">({polled.total} pairs)</span> : null}
      {status === 'failed' && error ? <span className="text-danger-600">— {error}</span> : null}
    </p>
  );
}

export default function LeaguePage({ loaderData, actionData }: Route.ComponentProps) {
  const { course, canEdit, canReveal, league, entries, library, created } = loaderData;
  const d = league.design;
  const changeable = league.state === 'open' || league.state === 'closed';
  const base = `/courses/${course.id}/leagues/${league.id}`;
  return (
    <>
      <PageHeader
        title={league.title}
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/leagues`, label: 'Strategy leagues' }]} />}
      >
        {league.hasResults ? <ButtonLink to={`${base}/results`}>Results</ButtonLink> : null}
        {league.hasResults && canReveal ? (
          <ButtonLink to={`${base}/reveal`} variant="secondary">
            Reveal on the big screen
          </ButtonLink>
        ) : null}
        <ButtonLink to={`${base}/export/entries.csv`} variant="secondary" reloadDocument>
          Entries CSV
        </ButtonLink>
        <ButtonLink to={`${base}/export/league.json`} variant="secondary" reloadDocument>
          JSON
        </ButtonLink>
      </PageHeader>
      <div className="mb-4 flex flex-col gap-2" aria-live="polite">
        {created && !actionData ? <Notice tone="ok">League created. Participants of the course can enter strategies now.</Notice> : null}
        {actionData ? <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice> : null}
      </div>

      <section aria-labelledby="settings" className="mb-6 grid gap-4 lg:grid-cols-[2fr_3fr]">
        <div className="rounded-lg border border-slate-200 bg-white p-4">
          <h2 id="settings" className="mb-2 text-lg font-semibold">
            Settings
          </h2>
          <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
            <dt className="text-slate-600">State</dt>
            <dd>
              <LeagueStateBadge state={league.state} /> <span className="text-slate-600">— {LEAGUE_STATE_WORDS[league.state].means}</span>
            </dd>
            <dt className="text-slate-600">Payoffs</dt>
            <dd className="num">
              R {d.payoffs.R} · S {d.payoffs.S} · T {d.payoffs.T} · P {d.payoffs.P}
            </dd>
            <dt className="text-slate-600">δ, ε</dt>
            <dd className="num">
              δ = {d.delta} (about {(1 / (1 - d.delta)).toFixed(1)} rounds per match) · ε = {d.epsilon}
            </dd>
            <dt className="text-slate-600">Simulation</dt>
            <dd>{d.matches > 0 ? `${d.matches} simulated matches per pair (seed ${d.seed})` : 'exact values only'}</dd>
            <dt className="text-slate-600">Evolution</dt>
            <dd>{d.generations} generations</dd>
            <dt className="text-slate-600">Deadline</dt>
            <dd>{league.deadline ? formatDate(league.deadline) : 'none: entries until closed'}</dd>
          </dl>
          {league.deltaWarning ? (
            <div className="mt-3">
              <Notice tone="warn">{league.deltaWarning}</Notice>
            </div>
          ) : null}
        </div>
        <div className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4">
          <h2 className="text-lg font-semibold">Next steps</h2>
          <RunStatus courseId={course.id} leagueId={league.id} initial={league} />
          {canEdit ? (
            <div className="flex flex-wrap gap-2">
              {league.state === 'open' ? <ActionButton intent="close">Close entries</ActionButton> : null}
              {league.state === 'closed' || league.state === 'run' ? (
                <ActionButton intent="run">{league.state === 'run' ? 'Run again' : 'Run the league'}</ActionButton>
              ) : null}
              {league.state === 'run' ? <ActionButton intent="publish">Publish results</ActionButton> : null}
              {league.state === 'published' ? (
                <ActionButton intent="unpublish" variant="secondary">
                  Unpublish
                </ActionButton>
              ) : null}
              {league.state === 'closed' || league.state === 'run' ? (
                <ActionButton intent="reopen" variant="secondary">
                  Reopen entries
                </ActionButton>
              ) : null}
            </div>
          ) : (
            <p className="text-slate-700">Only the course’s instructors change a league.</p>
          )}
          {league.state === 'open' && !league.accepting ? (
            <p className="text-slate-700">The deadline has passed: no more entries are accepted.</p>
          ) : null}
          {canEdit && changeable ? <DeadlineForm /> : null}
        </div>
      </section>

      <section aria-labelledby="entries">
        <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
          <h2 id="entries" className="text-lg font-semibold">
            Entries{' '}
            <span className="num font-normal text-slate-600">
              ({entries.length} of at most {LEAGUE_MAX_ENTRIES})
            </span>
          </h2>
          {canEdit && changeable ? (
            <Form method="post" className="flex flex-wrap items-end gap-2">
              <input type="hidden" name="intent" value="add-house" />
              <SelectField
                name="strategyId"
                label="Add a library strategy as a house entry"
                options={library.map((s) => ({ value: s.id, label: `${s.name} (${s.id})` }))}
              />
              <Button type="submit" variant="secondary">
                Add
              </Button>
            </Form>
          ) : null}
        </div>
        {entries.length === 0 ? (
          <p className="text-slate-700">
            No entries yet. Participants enter from their phones; you can add library strategies as house entries.
          </p>
        ) : (
          <DataTable
            columns={columnsFor(canEdit && changeable)}
            data={entries}
            caption="Entries of this league"
            filterLabel="Filter entries"
            initialSorting={[{ id: 'name', desc: false }]}
          />
        )}
        <p className="mt-3 text-sm text-slate-600">
          House entries are strategies you added from Parley’s library; they are labelled as such in the results.{' '}
          <Link to="/methods#league" className="text-accent-700 underline">
            How the numbers are computed
          </Link>
        </p>
      </section>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.league.title ?? 'League'} · Strategy leagues · Parley` }];
