// Projector mode of the Debrief: one chart at a time, large type, the dark high-contrast look of
// the big screen; ← / → (or the buttons) move between charts.
import { useCallback, useEffect, useState } from 'react';
import { Link } from 'react-router';
import type { Route } from './+types/projector';
import { debriefCharts } from '#app/components/debrief';
import { ChartFrame } from '#app/components/debrief-charts';
import { pickEstimate } from '#app/models/debrief.server';
import { estimateIncludedWords } from '#app/components/estimation-panel';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';
import { windowWords } from '#app/utils/estimate-form';
import { debriefFromUrl } from './from-url.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const url = new URL(request.url);
  const { include, sessions, estimates } = await debriefFromUrl(course.id, url);
  const done = estimates.filter((e) => e.status === 'done');
  const e = pickEstimate(done, url);
  return {
    course: { id: course.id, title: course.title, isDemo: course.isDemo },
    sessions,
    estimate: e?.result
      ? {
          id: e.id,
          groups: e.result.groups,
          B: e.result.bootstrap,
          seed: e.result.seed,
          window: windowWords(e.result.window),
          included: estimateIncludedWords(e.result),
        }
      : undefined,
    include,
    chart: url.searchParams.get('chart'),
  };
}

export default function Projector({ loaderData }: Route.ComponentProps) {
  const { course, sessions, estimate, chart, include } = loaderData;
  const charts = debriefCharts(course.id, sessions, estimate, include);
  const [index, setIndex] = useState(() =>
    Math.max(
      0,
      charts.findIndex((c) => c.id === chart),
    ),
  );
  const count = charts.length;
  const go = useCallback((delta: number) => setIndex((i) => (i + delta + count) % count), [count]);
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (e.key === 'ArrowRight' || e.key === 'PageDown') go(1);
      else if (e.key === 'ArrowLeft' || e.key === 'PageUp') go(-1);
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [go]);
  const c = charts[index];
  const back =
    `${sessions.length === 1 ? `/courses/${course.id}/debrief/${sessions[0].id}?` : `/courses/${course.id}/debrief/compare?sessions=${sessions.map((s) => s.id).join(',')}&`}${include === 'all' ? 'include=all' : ''}`.replace(
      /[?&]$/,
      '',
    );
  return (
    <div className="flex min-h-dvh flex-col gap-4 bg-slate-950 px-8 py-6 text-slate-50" data-theme="dark">
      <header className="flex flex-wrap items-center justify-between gap-4 text-2xl">
        <p className="font-semibold">
          {sessions.map((s) => s.treatment).join(' · ')}
          {sessions.some((s) => s.simulated) ? (
            <span className="ml-3 text-xl font-normal text-slate-300">◇ simulated demo data</span>
          ) : null}
        </p>
        <nav aria-label="Charts" className="flex items-center gap-3">
          <button
            type="button"
            onClick={() => go(-1)}
            className="min-h-14 rounded-lg border border-slate-500 px-5 font-semibold hover:bg-slate-800"
          >
            <span aria-hidden="true">←</span> Previous
          </button>
          <span className="num" aria-live="polite">
            {index + 1} / {charts.length}
          </span>
          <button
            type="button"
            onClick={() => go(1)}
            className="min-h-14 rounded-lg border border-slate-500 px-5 font-semibold hover:bg-slate-800"
          >
            Next <span aria-hidden="true">→</span>
          </button>
          <Link
            to={back}
            className="min-h-14 content-center rounded-lg px-4 font-semibold text-accent-200 underline-offset-4 hover:underline"
          >
            Leave projector mode
          </Link>
        </nav>
      </header>
      <main className="flex flex-1 flex-col">
        <ChartFrame
          key={c.id}
          id={c.id}
          title={c.title}
          csvHref={c.csvHref}
          summary={c.summary}
          notes={c.notes}
          theme="dark"
          height="h-[62vh]"
        >
          {c.render('dark', true)}
        </ChartFrame>
      </main>
      <p className="text-xl text-slate-300">Keys: ← and → move between charts.</p>
    </div>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Debrief · projector · Parley' }];
