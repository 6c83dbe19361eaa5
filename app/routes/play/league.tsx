// A strategy league on a participant's phone: build or revise an entry until the deadline (or
// until the instructor closes entries), see the saved entry afterwards, and the results once the
// instructor publishes them (the ranking with the participant's own entry marked, and the
// evolution). Only participants of the league's course reach it; anyone else gets a 404.
import { data, Form, Link, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/league';
import { type CompactEvolution, compactEvolution, EvolutionChart, sharePct, sharesInWords } from '#app/components/league-charts';
import { LeagueEntryEditor } from '#app/components/league-entry-editor';
import { ParticipantShell } from '#app/components/shells';
import { StrategyPreview } from '#app/components/strategy-preview';
import { Button, cx, Notice } from '#app/components/ui';
import type { Automaton } from '#app/lib/automata';
import { strategyInWords } from '#app/lib/strategy-words';
import { readStrategyFile } from '#app/lib/strategy-file';
import { entryAutomaton, participantLeague, saveEntry } from '#app/models/league.server';
import { requireUser } from '#app/utils/auth.server';
import { formatDateTime } from '#app/utils/format';
import { parseId, respondUnless } from '#app/utils/http.server';

const NOT_FOUND = 'No such league in your courses.';

/** The points of the payoff table in one line: "R 48 · S 12 · T 50 · P 25". */
const payoffWords = (p: { R: number; S: number; T: number; P: number }) => `R ${p.R} · S ${p.S} · T ${p.T} · P ${p.P}`;

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const leagueId = parseId(params.leagueId, 'league');
  const found = await participantLeague(leagueId, user.id);
  respondUnless(found, 404, NOT_FOUND);
  const { league, entry, defaultName, results } = found;
  return {
    email: user.email,
    league: {
      id: league.id,
      title: league.title,
      courseTitle: league.courseTitle,
      state: league.state,
      accepting: league.accepting,
      deadline: league.deadline?.toISOString() ?? null,
      payoffs: league.design.payoffs,
      delta: league.design.delta,
      epsilon: league.design.epsilon,
    },
    entry: entry ? { id: entry.id, name: entry.name, automaton: entryAutomaton(entry), updatedAt: entry.updatedAt.toISOString() } : null,
    defaultName,
    results: results ? resultsForPhone(results, entry?.id ?? null) : null,
  };
}

/** What a phone needs of the published results: names, ranks, scores, a compact evolution (no matrix, no strategies of others). */
function resultsForPhone(
  results: NonNullable<Awaited<ReturnType<typeof participantLeague>>>['results'] & object,
  ownEntryId: number | null,
) {
  const names = results.entries.map((e) => e.name);
  const own = results.entries.findIndex((e) => !e.house && e.entryId === ownEntryId);
  return {
    ranking: results.standings.map((s) => ({
      rank: s.rank,
      name: names[s.entry],
      score: s.score,
      house: results.entries[s.entry].house,
      mine: s.entry === own,
    })),
    own: own >= 0 ? own : null,
    evolution: compactEvolution({ names, shares: results.evolution.shares }) satisfies CompactEvolution,
    generations: results.evolution.shares.length - 1,
    background: results.evolution.background,
    survivors: results.survivors.map((s) => ({ name: names[s.entry], share: s.share })),
    ranAt: results.computedAt,
  };
}

const EntryForm = z.object({
  name: z.string().max(1_000, 'Keep the name short.'),
  strategy: z
    .string()
    .min(1, 'Pick a starting point and build your strategy before saving.')
    // a parley-strategy file of at most 6 states is well under 2 kB
    .max(20_000, 'This strategy is far larger than any league entry can be (at most 6 states).'),
});

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const leagueId = parseId(params.leagueId, 'league');
  const form = await request.formData();
  const parsed = EntryForm.safeParse({ name: form.get('name') ?? '', strategy: form.get('strategy') ?? '' });
  if (!parsed.success) {
    const byField = Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message]));
    return data({ saved: false as const, errors: { name: byField.name, strategy: byField.strategy } }, { status: 400 });
  }
  let raw: unknown;
  try {
    raw = JSON.parse(parsed.data.strategy);
  } catch {
    return data(
      { saved: false as const, errors: { strategy: 'Your strategy could not be read. Reload the page and build it again.' } },
      { status: 400 },
    );
  }
  const read = readStrategyFile(raw);
  if (!read.ok) {
    return data({ saved: false as const, errors: { strategy: read.issues.map((i) => i.message).join(' ') } }, { status: 400 });
  }
  const res = await saveEntry(leagueId, user.id, { name: parsed.data.name, automaton: read.automaton });
  if (res.ok) return { saved: true as const, errors: {} };
  respondUnless(res.reason !== 'not-found', 404, NOT_FOUND);
  if (res.reason === 'invalid') {
    const name = res.issues.find((i) => i.path === 'name')?.message;
    const rest = res.issues.filter((i) => i.path !== 'name').map((i) => i.message);
    return data({ saved: false as const, errors: { name, strategy: rest.length ? rest.join(' ') : undefined } }, { status: 400 });
  }
  // closed, past the deadline, or full: a refusal of the whole entry, nothing stored
  const message = `${res.issues[0]?.message ?? 'This league no longer takes entries.'} Nothing was saved.`;
  return data({ saved: false as const, errors: { refused: message } }, { status: 409 });
}

const STATE_WORDS = {
  open: 'Open for entries',
  closed: 'Entries closed',
  run: 'Entries closed',
  published: 'Results published',
} as const;

export default function LeaguePage({ loaderData, actionData }: Route.ComponentProps) {
  const { email, league, entry, defaultName, results } = loaderData;
  const nav = useNavigation();
  const saving = nav.state !== 'idle' && nav.formMethod === 'POST';
  const errors: { name?: string; strategy?: string; refused?: string } = actionData?.errors ?? {};
  const game = league.payoffs;
  return (
    <ParticipantShell email={email}>
      <div className="flex flex-col gap-1">
        <p className="text-sm text-slate-600">{league.courseTitle} · strategy league</p>
        <h1 className="text-3xl font-semibold">{league.title}</h1>
        <p className="text-sm text-slate-700" data-testid="league-state">
          {STATE_WORDS[league.state]}
          {league.state === 'open' && league.deadline
            ? league.accepting
              ? ` · until ${formatDateTime(league.deadline)}`
              : ` · the deadline (${formatDateTime(league.deadline)}) has passed`
            : ''}
        </p>
      </div>
      <p className="text-slate-700">
        Your strategy plays every other entry, and a copy of itself, in supergames where another round follows with probability δ ={' '}
        {league.delta}
        {league.epsilon > 0 ? `, and each intended move comes out the other way with probability ε = ${league.epsilon}` : ''}. Points per
        round: {payoffWords(game)} (R both cooperate, S you cooperate and your partner defects, T the reverse, P both defect).
      </p>

      {results ? <Results results={results} /> : null}

      {league.accepting ? (
        <Form method="post" className="flex flex-col gap-4" noValidate>
          {actionData?.saved && !saving ? (
            <Notice tone="ok" title="Entry saved">
              You can change it until entries close.
            </Notice>
          ) : entry ? (
            <Notice tone="info" title="Your entry is in">
              Saved {formatDateTime(entry.updatedAt)} as “{entry.name}”. Change it below and save again until entries close.
            </Notice>
          ) : null}
          {errors.refused ? (
            <Notice tone="error" title="Not saved">
              {errors.refused}
            </Notice>
          ) : null}
          <LeagueEntryEditor
            game={game}
            delta={league.delta}
            defaultName={entry?.name ?? defaultName}
            defaultStrategy={entry?.automaton}
            saved={entry ? { name: entry.name, automaton: entry.automaton } : null}
            errors={errors}
            submit={
              <Button type="submit" className="min-h-14 text-lg" disabled={saving}>
                {saving ? 'Saving…' : entry ? 'Save changes' : 'Enter this strategy'}
              </Button>
            }
          />
        </Form>
      ) : (
        <>
          {errors.refused ? (
            <Notice tone="error" title="Not saved">
              {errors.refused}
            </Notice>
          ) : null}
          {!results ? (
            <Notice tone="info" title={league.state === 'open' ? 'The deadline has passed' : 'Entries are closed'}>
              {entry ? 'Your entry is in as you last saved it.' : 'You did not enter a strategy in this league.'} The results appear here
              when your instructor publishes them.
            </Notice>
          ) : null}
          {entry ? <SavedEntry name={entry.name} automaton={entry.automaton} game={game} delta={league.delta} /> : null}
        </>
      )}
      <Link to="/" className="min-h-11 content-center font-semibold text-accent-700 underline underline-offset-4">
        Back to your courses
      </Link>
    </ParticipantShell>
  );
}

function SavedEntry({
  name,
  automaton,
  game,
  delta,
}: {
  name: string;
  automaton: Automaton;
  game: { R: number; S: number; T: number; P: number };
  delta: number;
}) {
  return (
    <section aria-labelledby="saved-entry" className="flex flex-col gap-2" data-testid="saved-entry">
      <h2 id="saved-entry" className="text-xl font-semibold">
        Your entry: {name}
      </h2>
      <p className="text-slate-700">
        Against you it {strategyInWords({ ...automaton, id: 'mine' }, { C: 'C', D: 'D' })}. {automaton.states.length}{' '}
        {automaton.states.length === 1 ? 'state' : 'states'}:
      </p>
      <ol className="flex flex-col gap-1 text-sm">
        {automaton.states.map((s, i) => (
          <li key={i} className="num rounded border border-slate-200 px-3 py-1">
            State {i + 1}
            {i === 0 ? ' (start)' : ''}: plays {s.action}; next after CC → {s.next.cc + 1}, CD → {s.next.cd + 1}, DC → {s.next.dc + 1}, DD →{' '}
            {s.next.dd + 1}
          </li>
        ))}
      </ol>
      <div className="overflow-x-auto">
        <StrategyPreview strategy={automaton} game={game} delta={delta} />
      </div>
    </section>
  );
}

type PhoneResults = NonNullable<Route.ComponentProps['loaderData']['results']>;

function Results({ results }: { results: PhoneResults }) {
  const mine = results.ranking.find((r) => r.mine);
  const n = results.ranking.length;
  return (
    <section aria-labelledby="league-results" className="flex flex-col gap-4" data-testid="league-results">
      <h2 id="league-results" className="text-2xl font-semibold">
        Results
      </h2>
      {mine ? (
        <p className="rounded-lg bg-accent-50 p-4 text-lg" data-testid="own-rank">
          Your entry “{mine.name}” ranked <strong className="num">{mine.rank}</strong> of {n}, with{' '}
          <strong className="num">{mine.score.toFixed(2)}</strong> points per round on average.
        </p>
      ) : (
        <p className="text-slate-700">You had no entry in this league.</p>
      )}
      <section aria-labelledby="ranking" className="flex flex-col gap-2">
        <h3 id="ranking" className="text-xl font-semibold">
          Ranking
        </h3>
        <p className="text-sm text-slate-600">
          Points per round, averaged over every entry (itself included), computed exactly rather than by playing sample matches.
        </p>
        <ol className="flex flex-col gap-1" data-testid="ranking">
          {results.ranking.map((r, i) => (
            <li
              key={i}
              aria-current={r.mine ? 'true' : undefined}
              className={cx(
                'grid grid-cols-[2.5rem_minmax(0,1fr)_auto] items-baseline gap-2 rounded-md px-3 py-2',
                r.mine ? 'bg-accent-700 font-semibold text-white' : 'bg-white ring-1 ring-slate-200',
              )}
            >
              <span className="num">{r.rank}</span>
              <span className="truncate">
                {r.name}
                {r.mine ? ' (you)' : ''}
                {r.house ? <span className={cx('text-sm', r.mine ? '' : 'text-slate-500')}> · house entry</span> : null}
              </span>
              <span className="num">{r.score.toFixed(2)}</span>
            </li>
          ))}
        </ol>
      </section>
      <section aria-labelledby="evolution" className="flex flex-col gap-2">
        <h3 id="evolution" className="text-xl font-semibold">
          Evolution
        </h3>
        <p className="text-sm text-slate-600">
          Start with equal numbers of every entry; each generation, an entry&apos;s share grows in proportion to its points per round
          against the population then (discrete replicator dynamics, background fitness {results.background}). After {results.generations}{' '}
          generations, still there (share at least {sharePct(1e-3)}): {sharesInWords(results.survivors) || 'none'}.
        </p>
        <EvolutionChart evolution={results.evolution} highlight={results.own ?? undefined} />
      </section>
    </section>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.league.title ?? 'League'} · strategy league · Parley` }];
