// A column chart for the projector: one column per round or supergame, its share as a bar with
// the percentage above, and rows of labels below (round number; supergame number and length).
// Plain HTML, so it is drawn on the server and needs no hydration. Each column says itself in
// words for screen readers; the drawing is hidden from them.

export interface Column {
  key: number;
  /** the share in [0, 1], null when there was nothing to count */
  rate: number | null;
  /** the column in words: "Round 2: 63 % chose X" */
  text: string;
  /** one short label per row of `rows` */
  below: string[];
}

/** More columns than this and the percentages no longer fit above their bars at 1920 px. */
const MAX_LABELLED = 20;

export const percent = (rate: number | null) => (rate === null ? '—' : `${Math.round(rate * 100)} %`);

export function ColumnChart({ columns, rows, testId }: { columns: Column[]; rows: string[]; testId: string }) {
  const labelled = columns.length <= MAX_LABELLED;
  // with many columns, label every step-th one so the labels stay legible
  const step = Math.ceil(columns.length / MAX_LABELLED);
  return (
    <div className="flex min-h-[7em] flex-1 gap-[0.4em]">
      <div aria-hidden="true" className="flex flex-col text-right text-[0.95em] text-slate-300">
        {/* 100 % centred on the top line of the bars, 0 % just above the axis */}
        <span className="flex-1 pt-[1.4em]">
          <span className="relative block h-full">
            <span className="absolute top-0 right-0 -translate-y-1/2 whitespace-nowrap">100 %</span>
            <span className="absolute right-0 bottom-0 leading-none whitespace-nowrap">0 %</span>
          </span>
        </span>
        {rows.map((r) => (
          <span key={r} className="h-[1.5em] leading-[1.5em]">
            {r}
          </span>
        ))}
      </div>
      <ol className="flex min-w-0 flex-1 gap-[0.25em] border-l border-slate-600 pl-[0.25em]">
        {columns.map((c, i) => {
          const pct = Math.round((c.rate ?? 0) * 100);
          const showLabel = labelled || i % step === 0 || i === columns.length - 1;
          return (
            <li key={c.key} data-testid={testId} className="flex max-w-[5em] min-w-0 flex-1 flex-col items-stretch">
              <span className="sr-only">{c.text}</span>
              <span aria-hidden="true" className="relative flex-1 pt-[1.4em]">
                <span className="relative block h-full">
                  <span className="absolute inset-x-[8%] bottom-0 rounded-t bg-accent-300" style={{ height: `${pct}%` }} />
                  {labelled ? (
                    <span
                      className="num absolute inset-x-0 text-center text-[0.95em] leading-none font-semibold whitespace-nowrap"
                      style={{ bottom: `calc(${pct}% + 0.25em)` }}
                    >
                      {percent(c.rate)}
                    </span>
                  ) : null}
                </span>
              </span>
              {c.below.map((b, j) => (
                <span
                  key={j}
                  aria-hidden="true"
                  className={`num h-[1.5em] text-center text-[0.95em] leading-[1.5em] whitespace-nowrap text-slate-200 ${j === 0 ? 'border-t border-slate-500' : ''}`}
                >
                  {showLabel ? b : ''}
                </span>
              ))}
            </li>
          );
        })}
      </ol>
    </div>
  );
}
