// A strategy league's reveal on the projector: the ranking from the bottom up, then the evolution
// (components/big-screen/league-reveal.tsx). Instructors and assistants only, and only once the
// league has run; aggregates only (entry names and scores, never an e-mail address).
import type { Route } from './+types/league-reveal';
import { LeagueReveal } from '#app/components/big-screen/league-reveal';
import { compactEvolution } from '#app/components/league-charts';
import { LIBRARY, libraryStrategy } from '#app/lib/automata';
import { classComparison } from '#app/lib/league';
import { classEstimates, entryAutomaton, getLeague } from '#app/models/league.server';
import { parseId, respond, respondUnless } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor', 'assistant']);
  const league = await getLeague(course.id, parseId(params.leagueId, 'league'));
  respondUnless(league, 404, 'No such league in this course.');
  if ((league.state !== 'run' && league.state !== 'published') || !league.results) {
    respond(409, 'This league has not been run yet: close it to entries and run it first, then reveal it.');
  }
  const r = league.results;
  const names = r.entries.map((e) => e.name);
  const { payoffs: p, delta, epsilon } = r.design;
  // The class beside the league, when the league keeps a session with an estimate (staff results page).
  const chosen = league.comparisonSessionId
    ? ((await classEstimates(course.id)).find((e) => e.sessionId === league.comparisonSessionId) ?? null)
    : null;
  let classSlide = null;
  if (chosen) {
    const c = classComparison(
      { strategies: chosen.strategies, shares: chosen.shares, errorProbability: chosen.errorProbability },
      r.entries.map((e) => entryAutomaton(e)),
      p,
      delta,
      r.design.generations,
      libraryStrategy,
    );
    classSlide = {
      session: `${chosen.sessionName}, session ${chosen.sessionId}`,
      simulated: chosen.simulated,
      subjects: chosen.subjects,
      errorProbability: chosen.errorProbability,
      mix: chosen.strategies
        .map((id, k) => ({ id, name: LIBRARY.find((a) => a.id === id)?.name ?? id, share: chosen.shares[k] }))
        .sort((a, b) => b.share - a.share),
      entries: names.map((name, k) => ({ name, value: c.entriesAgainstMix[k] })).sort((a, b) => b.value - a.value),
      otherGame:
        chosen.payoffs.R === p.R &&
        chosen.payoffs.S === p.S &&
        chosen.payoffs.T === p.T &&
        chosen.payoffs.P === p.P &&
        chosen.delta === delta
          ? null
          : `R ${chosen.payoffs.R}, S ${chosen.payoffs.S}, T ${chosen.payoffs.T}, P ${chosen.payoffs.P} and δ = ${chosen.delta}`,
    };
  }
  return {
    classSlide,
    course: { id: course.id, isDemo: course.isDemo },
    league: { id: league.id, title: league.title },
    entries: r.standings.map((s) => ({ rank: s.rank, name: names[s.entry], score: s.score, house: r.entries[s.entry].house })),
    evolution: compactEvolution({ names, shares: r.evolution.shares }),
    background: r.evolution.background,
    survivors: r.survivors.map((s) => ({ name: names[s.entry], share: s.share })),
    settings: `δ = ${delta}${epsilon > 0 ? `, ε = ${epsilon}` : ', no execution errors'} · points per round R ${p.R}, S ${p.S}, T ${p.T}, P ${p.P}`,
  };
}

/** The big screen's type scale: ≈ 30 px on a 1920×1080 projector, 16 px on a phone. */
const BASE_FONT = 'clamp(16px, min(1.55vw, 2.8vh), 40px)';

export default function LeagueRevealPage({ loaderData }: Route.ComponentProps) {
  const { course, league, entries, evolution, background, survivors, settings, classSlide } = loaderData;
  return (
    <main className="min-h-dvh w-full bg-slate-950 text-slate-50" style={{ fontSize: BASE_FONT }} data-theme="dark">
      <LeagueReveal
        title={league.title}
        entries={entries}
        evolution={evolution}
        background={background}
        survivors={survivors}
        settings={settings}
        classSlide={classSlide}
        simulated={course.isDemo}
      />
    </main>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.league.title ?? 'League'} · reveal · Parley` }];
