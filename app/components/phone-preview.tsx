import { useState } from 'react';
import { InstructionsBody, InstructionsHeading } from '#app/components/instructions-view';
import { PayoffTable } from '#app/components/live/payoff-table';
import type { Design } from '#app/lib/design';
import { fillInstructions, instructionSummary, payoffRows } from '#app/lib/instructions';

type Screen = 'instructions' | 'play';

/**
 * The design editor's phone-sized preview (390 px wide, as the phones of tests/helpers/browser.ts):
 * the instructions page and the game's choice screen with the design as it stands in the form.
 * The play screen is drawn here with the game screen's sizes and shapes; it sends nothing.
 */
export function PhonePreview({ design, text, course }: { design: Design | null; text: string; course: string }) {
  const [screen, setScreen] = useState<Screen>('instructions');
  const tab = (s: Screen, label: string) => (
    <button
      type="button"
      role="tab"
      aria-selected={screen === s}
      aria-controls="phone-preview-screen"
      onClick={() => setScreen(s)}
      className="min-h-11 rounded-md px-3 font-semibold text-slate-700 hover:bg-slate-100 aria-selected:bg-accent-50 aria-selected:text-accent-800"
    >
      {label}
    </button>
  );
  return (
    <section
      aria-labelledby="preview-title"
      className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4"
      data-testid="phone-preview"
    >
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="preview-title" className="text-lg font-semibold">
          Phone preview
        </h2>
        <div role="tablist" aria-label="Phone screen" className="flex gap-1">
          {tab('instructions', 'Instructions')}
          {tab('play', 'Play screen')}
        </div>
      </div>
      {design ? (
        <div
          id="phone-preview-screen"
          role="tabpanel"
          tabIndex={0}
          aria-label={screen === 'instructions' ? 'Instructions as a phone shows them' : 'Play screen as a phone shows it'}
          className="mx-auto h-[44rem] w-[390px] max-w-full overflow-y-auto rounded-[2rem] border-[10px] border-slate-800 bg-slate-50"
        >
          <div className="flex flex-col gap-6 px-4 py-6">
            {screen === 'instructions' ? (
              <>
                <InstructionsHeading heading={{ course, instructor: null }} code="······" preview />
                <InstructionsBody
                  summary={instructionSummary(design)}
                  table={payoffRows(design.payoffs)}
                  labels={design.labels}
                  instructions={fillInstructions(design, text.trim() ? text : undefined)}
                  preview
                />
                <span className="flex min-h-16 items-center justify-center rounded-lg bg-accent-700 text-xl font-semibold text-white">
                  {design.comprehension || design.practice ? 'I have read this — continue' : 'I have read this — join'}
                </span>
              </>
            ) : (
              <PlayScreen design={design} />
            )}
          </div>
        </div>
      ) : (
        <p className="text-sm text-slate-600">Fix the fields marked above to see the preview.</p>
      )}
    </section>
  );
}

function PlayScreen({ design }: { design: Design }) {
  const shapes = { C: '◆', D: '●' } as const;
  return (
    <>
      <p className="text-sm text-slate-600">
        You are <strong className="text-slate-900">P-017</strong> · <span aria-hidden="true">●</span> connected
      </p>
      <div className="flex items-baseline justify-between">
        <h3 className="text-2xl font-semibold">Supergame 1 · Round 1</h3>
        <span className="num text-xl font-semibold">{design.roundSeconds} s</span>
      </div>
      <PayoffTable table={payoffRows(design.payoffs)} labels={design.labels} />
      <p className="text-center text-lg">Choose:</p>
      <div className="grid grid-cols-2 gap-3">
        {(['C', 'D'] as const).map((a) => (
          <span
            key={a}
            className="flex min-h-32 flex-col items-center justify-center gap-1 rounded-2xl border-2 border-slate-400 bg-slate-100 text-3xl font-bold text-slate-900"
          >
            <span aria-hidden="true" className="text-4xl">
              {shapes[a]}
            </span>
            {design.labels[a]}
          </span>
        ))}
      </div>
    </>
  );
}
