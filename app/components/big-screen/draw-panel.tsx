// The round's draw, large: the moment the room learns whether the supergame goes on. Shown once
// every pair has seen it on their phones (the view's latestDraw), so the screen never runs ahead.
import type { BigScreenView } from '#realtime/engine/types';

type Draw = NonNullable<BigScreenView['latestDraw']>;

/** "Draw 46 ≤ 75 — another round" / "Draw 81 > 75 — the supergame ends" */
export function drawHeadline(draw: number, cutoff: number): string {
  return draw <= cutoff ? `Draw ${draw} ≤ ${cutoff} — another round` : `Draw ${draw} > ${cutoff} — the supergame ends`;
}

/** The rule in words, as the phones' instructions give it (the range is 1–1000 or 1–10000 when 100·δ is not whole). */
function ruleText(rule: BigScreenView['drawRule'], withCutoff: boolean): string {
  const drawn = `After each round a number from 1 to ${rule.max} is drawn, the same for every pair`;
  return withCutoff ? `${drawn}: another round while it is ≤ ${rule.cutoff}.` : `${drawn}.`;
}

/** The draw on the range 1…max, with the part that continues and the part that ends. */
function DrawLine({ draws, rule }: { draws: number[]; rule: BigScreenView['drawRule'] }) {
  const at = (n: number) => `${((n - 0.5) / rule.max) * 100}%`;
  return (
    <div aria-hidden="true" className="flex flex-col gap-[0.2em]">
      <div className="relative h-[0.7em]">
        <span className="absolute inset-y-0 left-0 rounded-l bg-accent-700" style={{ width: `${(rule.cutoff / rule.max) * 100}%` }} />
        <span className="absolute inset-y-0 right-0 rounded-r bg-slate-600" style={{ width: `${(1 - rule.cutoff / rule.max) * 100}%` }} />
        {draws.map((d, i) => (
          <span
            key={i}
            className="absolute -top-[0.35em] h-[1.4em] w-[0.3em] -translate-x-1/2 rounded bg-slate-50"
            style={{ left: at(d) }}
          />
        ))}
      </div>
      <div className="relative h-[1.4em] text-[0.95em] text-slate-300">
        <span className="absolute left-0">1</span>
        <span className="absolute -translate-x-1/2 whitespace-nowrap" style={{ left: at(rule.cutoff) }}>
          {rule.cutoff}
        </span>
        <span className="absolute right-0">{rule.max}</span>
      </div>
    </div>
  );
}

export function DrawPanel({
  draw,
  rule,
  currentSupergame,
}: {
  draw: Draw | null;
  rule: BigScreenView['drawRule'];
  currentSupergame: number;
}) {
  const block = draw?.sentence != null;
  let caption: string;
  if (!draw) caption = 'The first draw comes once every pair has played round 1.';
  else if (block) caption = `Supergame ${draw.supergame}, rounds ${draw.fromRound}–${draw.toRound}`;
  else if (draw.supergame !== currentSupergame) caption = `The last draw of supergame ${draw.supergame}, after round ${draw.toRound}`;
  else caption = `Supergame ${draw.supergame}, after round ${draw.toRound}`;
  return (
    <section
      aria-label="The draw"
      className="flex flex-col gap-[0.3em] rounded-xl border border-slate-700 bg-slate-900 px-[0.8em] py-[0.6em]"
    >
      <p className="text-slate-300">{caption}</p>
      <div role="status" aria-live="polite">
        {draw && !block ? (
          <p data-testid="big-draw" className="num text-[2.6em] leading-tight font-bold">
            {drawHeadline(draw.draws[0], rule.cutoff)}
          </p>
        ) : draw ? (
          <>
            <p data-testid="big-draw" className="num text-[2.2em] leading-tight font-bold">
              Draws {draw.draws.join(' · ')}
            </p>
            <p>{draw.sentence}</p>
          </>
        ) : (
          <p className="text-[1.6em] leading-tight font-semibold">Another round while the draw is ≤ {rule.cutoff}</p>
        )}
      </div>
      <DrawLine draws={draw?.draws ?? []} rule={rule} />
      <p className="text-slate-300">{ruleText(rule, draw !== null)}</p>
    </section>
  );
}
