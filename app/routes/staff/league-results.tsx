// A league's results (staff): ranking, pairwise heat-map, evolution, survivors, exports, and
// "Compare with the class": a session of the course with a strategy-frequency estimate, its
// strategies valued at the league's payoffs and δ with execution error ε = 1 − β.
import { data, Form, Link } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/league-results';
import { compactEvolution, EvolutionChart } from '#app/components/league-charts';
import { backgroundWords, HeatMapTable, type RankedRow, RankingTable } from '#app/components/league-results';
import { LeagueStateBadge } from '#app/components/league-words';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, ButtonLink, Notice, SelectField } from '#app/components/ui';
import { libraryStrategy } from '#app/lib/automata';
import { classComparison } from '#app/lib/league';
import { entryLabel } from '#app/lib/league-export';
import { classEstimates, entryAutomaton, getLeague, setComparisonSession } from '#app/models/league.server';
import { formatDate } from '#app/utils/format';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

/** Above this many entries the heat-map is not drawn (the matrix CSV has every value). */
const MATRIX_MAX = 40;

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const league = await getLeague(course.id, parseId(params.leagueId, 'league'));
  respondUnless(league, 404, 'No such league in this course.');
  const results = league.results;
  respondUnless(results, 409, 'This league has not been run yet: close its entries and run it first.');
  const showNames = role !== 'researcher';
  const names = results.entries.map((e) => entryLabel(e, showNames));
  const last = results.evolution.shares[results.evolution.shares.length - 1];
  const ranking: RankedRow[] = results.standings.map((s) => ({
    index: s.entry,
    rank: s.rank,
    name: names[s.entry],
    house: results.entries[s.entry].house,
    score: s.score,
    simScore: results.simulated?.scores[s.entry].score ?? null,
    simSe: results.simulated?.scores[s.entry].se ?? null,
    finalShare: last[s.entry],
  }));
  const p = results.design.payoffs;

  // the class beside the league
  const estimates = await classEstimates(course.id);
  const raw = new URL(request.url).searchParams.get('session');
  const wanted = raw !== null ? Number(raw) : league.comparisonSessionId;
  const chosen = estimates.find((e) => e.sessionId === wanted) ?? null;
  let comparison = null;
  if (chosen) {
    const c = classComparison(
      { strategies: chosen.strategies, shares: chosen.shares, errorProbability: chosen.errorProbability },
      results.entries.map((e) => entryAutomaton(e)),
      p,
      results.design.delta,
      results.design.generations,
      libraryStrategy,
    );
    const lastClass = c.evolution.shares[c.evolution.shares.length - 1];
    comparison = {
      ...chosen,
      earnings: c.earnings,
      mean: c.mean,
      // every class strategy keeps its own line, extinct ones too (they are few)
      evolution: {
        background: c.evolution.background,
        chart: compactEvolution({ names: chosen.strategies, shares: c.evolution.shares }, chosen.strategies.length, 0),
      },
      lastShares: lastClass,
      entries: results.entries
        .map((_, k) => ({
          name: names[k],
          house: results.entries[k].house,
          value: c.entriesAgainstMix[k],
          league: results.standings.find((s) => s.entry === k)!.score,
        }))
        .sort((a, b) => b.value - a.value),
      samePayoffs:
        chosen.payoffs.R === p.R &&
        chosen.payoffs.S === p.S &&
        chosen.payoffs.T === p.T &&
        chosen.payoffs.P === p.P &&
        chosen.delta === results.design.delta,
    };
  }
  return {
    course,
    canEdit: role === 'instructor',
    league: { id: league.id, title: league.title, state: league.state, comparisonSessionId: league.comparisonSessionId },
    design: results.design,
    computedAt: results.computedAt,
    ms: results.ms,
    names,
    ranking,
    matrix: results.entries.length <= MATRIX_MAX ? { perRound: results.perRound, order: results.standings.map((s) => s.entry) } : null,
    entryCount: results.entries.length,
    simulated: results.simulated ? { matches: results.simulated.matches, seed: results.simulated.seed } : null,
    // a few lines, thinned generations: a 200-entry league's full shares would be megabytes
    evolution: { background: results.evolution.background, chart: compactEvolution({ names, shares: results.evolution.shares }, 8) },
    survivors: results.survivors.map((s) => ({ name: names[s.entry], house: results.entries[s.entry].house, share: s.share })),
    range: { lo: Math.min(p.S, p.P), hi: Math.max(p.T, p.R) },
    estimates: estimates.map((e) => ({
      sessionId: e.sessionId,
      label: `${e.sessionName} (session ${e.sessionId}${e.simulated ? ', simulated' : ''}), supergames ${e.window}`,
    })),
    comparison,
  };
}

const Keep = z.object({ intent: z.literal('keep-comparison'), sessionId: z.union([z.literal(''), z.coerce.number().int().positive()]) });

export async function action({ request, params }: Route.ActionArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor']);
  const leagueId = parseId(params.leagueId, 'league');
  const parsed = Keep.safeParse(Object.fromEntries(await request.formData()));
  if (!parsed.success) return data({ ok: false, message: 'Choose a session to compare with.' }, { status: 400 });
  const ok = await setComparisonSession(course.id, leagueId, parsed.data.sessionId === '' ? null : parsed.data.sessionId);
  respondUnless(ok, 404, 'No such league or session in this course.');
  return { ok: true, message: 'This comparison is kept with the league.' };
}

const f3 = (x: number) => x.toFixed(3);
const pct = (x: number) => `${(100 * x).toFixed(1)} %`;

export default function LeagueResults({ loaderData, actionData }: Route.ComponentProps) {
  const { course, league, design, ranking, matrix, names, evolution, survivors, simulated, comparison, estimates, canEdit } = loaderData;
  const base = `/courses/${course.id}/leagues/${league.id}`;
  const winner = ranking[0];
  return (
    <>
      <PageHeader
        title={`Results: ${league.title}`}
        eyebrow={
          <CourseCrumbs
            course={course}
            trail={[
              { to: `/courses/${course.id}/leagues`, label: 'Strategy leagues' },
              { to: base, label: league.title },
            ]}
          />
        }
      >
        {(['results.csv', 'matrix.csv', 'evolution.csv', 'entries.csv', 'league.json'] as const).map((file) => (
          <ButtonLink key={file} to={`${base}/export/${file}`} variant="secondary" reloadDocument>
            <span aria-hidden="true">⤓</span> {file}
          </ButtonLink>
        ))}
      </PageHeader>
      <div className="mb-4" aria-live="polite">
        {actionData ? <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice> : null}
      </div>
      <p className="mb-2 text-slate-700">
        <LeagueStateBadge state={league.state} />
        {league.state === 'published'
          ? ' — participants of the course see these results.'
          : ' — only staff see these results until you publish them.'}{' '}
        Computed {formatDate(loaderData.computedAt)} in {(loaderData.ms / 1000).toFixed(1)} s.
      </p>
      <p className="mb-6 max-w-4xl text-slate-700">
        {loaderData.entryCount} entries, each against every entry and against a copy of itself, as in Axelrod’s tournaments (Axelrod 1984).
        Payoffs R {design.payoffs.R}, S {design.payoffs.S}, T {design.payoffs.T}, P {design.payoffs.P}; after each round another follows
        with probability δ = {design.delta}
        {design.epsilon > 0 ? `; each intended action is flipped with probability ε = ${design.epsilon}` : ''}. Values are exact expected
        payoffs per round (no luck involved), in the points of the payoff table.
        {winner ? ` First: ${winner.name}, ${f3(winner.score)} points per round.` : ''}
      </p>

      <section aria-labelledby="ranking" className="mb-8">
        <h2 id="ranking" className="mb-3 text-lg font-semibold">
          Ranking
        </h2>
        <RankingTable rows={ranking} simulated={simulated !== null} />
        <p className="mt-2 max-w-4xl text-sm text-slate-600">
          Equal scores share a rank. “Mean per round” is an entry’s average over all entries, itself included.
          {simulated
            ? ` The simulated mean plays ${simulated.matches} matches per pair with random ends and errors (seed ${simulated.seed}); ± is one standard error, to show how much luck a played tournament of this size has.`
            : ''}
        </p>
      </section>

      <section aria-labelledby="matrix" className="mb-8">
        <h2 id="matrix" className="mb-3 text-lg font-semibold">
          Who earns what against whom
        </h2>
        {matrix ? (
          <>
            <HeatMapTable names={names} order={matrix.order} perRound={matrix.perRound} lo={loaderData.range.lo} hi={loaderData.range.hi} />
            <p className="mt-2 text-sm text-slate-600">
              Each cell: what the row’s entry earns per round against the column’s entry. Darker cells are higher values, from{' '}
              {loaderData.range.lo} (lightest) to {loaderData.range.hi} (darkest); the outlined diagonal is each entry against itself. Rows
              and columns follow the ranking.
            </p>
          </>
        ) : (
          <p className="text-slate-700">
            With {loaderData.entryCount} entries the table would have {loaderData.entryCount ** 2} cells; download{' '}
            <a className="text-accent-700 underline" href={`${base}/export/matrix.csv`} download>
              matrix.csv
            </a>{' '}
            for every value.
          </p>
        )}
      </section>

      <section aria-labelledby="evolution" className="mb-8 grid gap-4 lg:grid-cols-[3fr_1fr]">
        <figure
          data-chart="league-evolution"
          className="flex flex-col gap-2 rounded-lg border border-slate-200 bg-white p-4"
          aria-labelledby="evolution"
        >
          <h2 id="evolution" className="text-lg font-semibold">
            Evolution over {design.generations} generations
          </h2>
          <EvolutionChart evolution={evolution.chart} height="h-96 sm:h-80" />
          <figcaption className="text-sm text-slate-600">
            Every entry starts with an equal share of the population. {backgroundWords(evolution.background)} (Discrete replicator dynamics,
            Taylor & Jonker 1978; the ecological tournament of Axelrod 1984, ch. 2.){' '}
            <Link to="/methods#league" className="font-semibold text-accent-700 underline underline-offset-4">
              How this is computed
            </Link>
          </figcaption>
        </figure>
        <div className="rounded-lg border border-slate-200 bg-white p-4">
          <h2 className="mb-2 text-lg font-semibold">Survivors</h2>
          <p className="mb-2 text-sm text-slate-600">Entries with at least 0.1 % of the population after the last generation.</p>
          <ol className="flex flex-col gap-1" data-testid="league-survivors">
            {survivors.map((s) => (
              <li key={s.name} className="flex justify-between gap-2">
                <span>
                  {s.name}
                  {s.house ? <span className="text-slate-600"> (house)</span> : null}
                </span>
                <span className="num">{pct(s.share)}</span>
              </li>
            ))}
          </ol>
        </div>
      </section>

      <section aria-labelledby="compare" className="mb-8 rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="compare" className="mb-2 text-lg font-semibold">
          Compare with the class
        </h2>
        <p className="mb-3 max-w-4xl text-slate-700">
          How would the league’s entries fare among the strategies the class actually used? Choose a session of this course that has a
          strategy-frequency estimate (Dal Bó &amp; Fréchette 2011; run one from the session’s Debrief). Its estimated strategies are valued
          at this league’s payoffs and δ, with the estimate’s error rate 1 − β as execution error.
        </p>
        {estimates.length === 0 ? (
          <p className="text-slate-700">
            No session of this course has a finished strategy-frequency estimate yet.{' '}
            <Link to={`/courses/${course.id}/debrief`} className="text-accent-700 underline">
              Open the Debrief
            </Link>{' '}
            to run one.
          </p>
        ) : (
          <div className="flex flex-wrap items-end gap-3">
            <Form method="get" className="flex flex-wrap items-end gap-2">
              <SelectField
                name="session"
                label="Session"
                defaultValue={comparison ? String(comparison.sessionId) : ''}
                options={[
                  { value: '', label: 'Choose a session…' },
                  ...estimates.map((e) => ({ value: String(e.sessionId), label: e.label })),
                ]}
              />
              <Button type="submit" variant="secondary">
                Compare
              </Button>
            </Form>
            {canEdit && comparison && comparison.sessionId !== league.comparisonSessionId ? (
              <Form method="post">
                <input type="hidden" name="intent" value="keep-comparison" />
                <input type="hidden" name="sessionId" value={comparison.sessionId} />
                <Button type="submit" variant="quiet">
                  Keep this comparison with the league
                </Button>
              </Form>
            ) : null}
          </div>
        )}
        {comparison ? (
          <div className="mt-4 grid gap-4 lg:grid-cols-2" data-testid="league-comparison">
            <div>
              <h3 className="mb-2 font-semibold">
                The class’s estimated mix ({comparison.subjects} participants, supergames {comparison.window})
              </h3>
              <table className="w-full text-sm">
                <caption className="sr-only">Estimated strategy shares of the class and what each earns against the class’s mix</caption>
                <thead>
                  <tr className="border-b border-slate-200">
                    <th scope="col" className="py-1 text-left">
                      Strategy
                    </th>
                    <th scope="col" className="py-1 text-right">
                      Estimated share
                    </th>
                    <th scope="col" className="py-1 text-right">
                      Earns against the mix
                    </th>
                    <th scope="col" className="py-1 text-right">
                      Share after {design.generations} generations
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {comparison.strategies.map((s, k) => (
                    <tr key={s} className="border-b border-slate-100">
                      <th scope="row" className="py-1 text-left font-semibold">
                        {s}
                      </th>
                      <td className="num py-1 text-right">{pct(comparison.shares[k])}</td>
                      <td className="num py-1 text-right">{f3(comparison.earnings[k])}</td>
                      <td className="num py-1 text-right">{pct(comparison.lastShares[k])}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <figure data-chart="league-class-evolution" className="mt-4" aria-labelledby="class-evolution">
                <h3 id="class-evolution" className="mb-1 font-semibold">
                  Evolution from the class’s mix
                </h3>
                <EvolutionChart evolution={comparison.evolution.chart} height="h-64" />
                <figcaption className="text-sm text-slate-600">{backgroundWords(comparison.evolution.background)}</figcaption>
              </figure>
              <p className="mt-2 text-sm text-slate-600">
                The mix earns {f3(comparison.mean)} per round on average. Execution error ε = 1 − β ={' '}
                {comparison.errorProbability.toFixed(3)}. The evolution starts from the class’s own mix instead of equal shares.
                {comparison.samePayoffs
                  ? ''
                  : ` The session was played at other payoffs or another δ (R ${comparison.payoffs.R}, S ${comparison.payoffs.S}, T ${comparison.payoffs.T}, P ${comparison.payoffs.P}, δ ${comparison.delta}); the strategies are valued here at the league’s.`}
              </p>
            </div>
            <div>
              <h3 className="mb-2 font-semibold">Every entry against the class’s mix</h3>
              <div className="max-h-96 overflow-auto">
                <table className="w-full text-sm">
                  <caption className="sr-only">
                    Each league entry’s per-round payoff against the class’s estimated mix, and in the league
                  </caption>
                  <thead>
                    <tr className="border-b border-slate-200">
                      <th scope="col" className="py-1 text-left">
                        Entry
                      </th>
                      <th scope="col" className="py-1 text-right">
                        Against the class
                      </th>
                      <th scope="col" className="py-1 text-right">
                        In the league
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {comparison.entries.map((e, k) => (
                      <tr key={k} className="border-b border-slate-100">
                        <th scope="row" className="py-1 text-left font-normal">
                          {e.name}
                          {e.house ? <span className="text-slate-600"> (house)</span> : null}
                        </th>
                        <td className="num py-1 text-right">{f3(e.value)}</td>
                        <td className="num py-1 text-right">{f3(e.league)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </div>
          </div>
        ) : null}
      </section>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Results: ${data?.league.title ?? 'League'} · Parley` }];
