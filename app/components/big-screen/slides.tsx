// The big screen's last word: a closing slide when the session completes (cooperation and length
// of each supergame), a plain slide when it was cancelled.
import type { BigScreenView } from '#realtime/engine/types';
import { ColumnChart, percent } from './column-chart';

export function ClosingSlide({ view, labelC }: { view: BigScreenView; labelC: string }) {
  const played = view.bySupergame;
  const cut = played.some((x) => x.truncated);
  return (
    <section aria-labelledby="closing" className="flex flex-1 flex-col gap-[0.6em]">
      <h1 id="closing" className="text-[2.4em] leading-tight font-bold">
        Thank you — the session is over
      </h1>
      <p className="text-slate-200">
        {view.joined} joined · {played.length} {played.length === 1 ? 'supergame' : 'supergames'} played. Your points are on your phone.
      </p>
      {played.length ? (
        <>
          <h2 className="text-[1.2em] font-semibold">Share choosing {labelC} in each supergame, and how many rounds it lasted</h2>
          <ColumnChart
            testId="closing-supergame"
            rows={['Supergame', 'Rounds']}
            columns={played.map((x) => ({
              key: x.supergame,
              rate: x.cooperation,
              text: `Supergame ${x.supergame}: ${x.cooperation === null ? 'no own choices' : `${percent(x.cooperation)} chose ${labelC}`}, ${x.truncated ? 'ended early by the instructor' : `${x.length} ${x.length === 1 ? 'round' : 'rounds'}`}.`,
              below: [String(x.supergame), x.truncated ? '×' : String(x.length)],
            }))}
          />
          {cut ? <p className="text-slate-300">× ended early by the instructor</p> : null}
        </>
      ) : null}
    </section>
  );
}

export function CancelledSlide() {
  return (
    <section aria-labelledby="cancelled" className="flex flex-1 flex-col justify-center gap-[0.6em]">
      <h1 id="cancelled" className="text-[2.4em] leading-tight font-bold">
        <span aria-hidden="true">⊘ </span>This session was cancelled
      </h1>
      <p className="text-slate-200">It was called off before it started: no choices were made, and its join code no longer works.</p>
    </section>
  );
}
