import { PayoffTable } from '#app/components/live/payoff-table';
import type { payoffRows } from '#app/lib/instructions';

export interface InstructionsViewProps {
  heading: { course: string; instructor: string | null };
  code: string;
  summary: string[];
  table: ReturnType<typeof payoffRows>;
  labels: { C: string; D: string };
  /** the full instructions, placeholders filled */
  instructions: string;
}

/** The course and the instructor first: a student in a lecture hall checks they are in the right room. */
export function InstructionsHeading({
  heading,
  code,
  preview = false,
}: Pick<InstructionsViewProps, 'heading' | 'code'> & { preview?: boolean }) {
  // Inside the design editor's preview the page's own headings come first: one level down.
  const Title = preview ? 'h3' : 'h1';
  return (
    <header className="flex flex-col gap-1">
      <Title className="text-2xl leading-tight font-semibold">{heading.course}</Title>
      <p className="text-slate-700">
        {heading.instructor ? <>with {heading.instructor} · </> : null}
        <span className="whitespace-nowrap">
          session code <span className="font-mono tracking-wider">{code}</span>
        </span>
      </p>
    </header>
  );
}

/**
 * What a phone reads before play, above the consent question: a short summary, the payoff table,
 * and the full rules one tap away. Shared by the instructions page and the design editor's preview.
 */
export function InstructionsBody({
  summary,
  table,
  labels,
  instructions,
  preview = false,
}: Omit<InstructionsViewProps, 'heading' | 'code'> & { preview?: boolean }) {
  const Title = preview ? 'h4' : 'h2';
  const id = preview ? 'preview-how' : 'how';
  return (
    <section aria-labelledby={id} className="flex flex-col gap-3">
      <Title id={id} className="text-xl font-semibold">
        In short
      </Title>
      <ul className="flex list-disc flex-col gap-2 pl-5 text-base leading-snug text-slate-800" data-testid="summary">
        {summary.map((line) => (
          <li key={line}>{line}</li>
        ))}
      </ul>
      <PayoffTable table={table} labels={labels} />
      <details className="rounded-lg border border-slate-200 bg-white">
        <summary className="min-h-12 cursor-pointer content-center px-4 font-semibold text-accent-700">All the rules, in full</summary>
        <div
          className="flex flex-col gap-3 px-4 pb-4 text-base leading-relaxed whitespace-pre-line text-slate-800"
          data-testid="instructions"
        >
          {instructions}
        </div>
      </details>
    </section>
  );
}
