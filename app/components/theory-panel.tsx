import { type Design } from '#app/lib/design';
import { checkStageGame, type StageGame } from '#app/lib/stage-game';
import { blockTermination, classTimePlanner, expectedLength, medianLength, pLengthAtLeast } from '#app/lib/termination';
import { basinWords, theoryAt } from '#app/lib/thresholds';
import { LengthChart, ThresholdChart } from './theory-charts';

const fmt = (x: number, d = 3) => String(Number(x.toFixed(d)));

export interface TheoryDraft {
  game: Partial<StageGame>;
  delta: number | undefined;
  supergames: number | undefined;
  roundSeconds: number | undefined;
  termination: Design['termination'] | { kind: 'block'; k: number | undefined };
}

type VerdictValue = 'yes' | 'no' | 'tie';

function Verdict({ value }: { value: VerdictValue }) {
  if (value === 'tie')
    return (
      <span className="inline-flex items-center gap-1 font-semibold text-slate-800">
        <span aria-hidden="true">=</span> tie: neither strictly
      </span>
    );
  return value === 'yes' ? (
    <span className="inline-flex items-center gap-1 font-semibold text-accent-800">
      <span aria-hidden="true">✓</span> yes
    </span>
  ) : (
    <span className="inline-flex items-center gap-1 font-semibold text-slate-700">
      <span aria-hidden="true">✕</span> no
    </span>
  );
}

const verdictOf = (yes: boolean | 'tie'): VerdictValue => (yes === 'tie' ? 'tie' : yes ? 'yes' : 'no');

const complete = (g: Partial<StageGame>): g is StageGame => [g.R, g.S, g.T, g.P].every((x) => typeof x === 'number' && Number.isFinite(x));

/** The theory panel of the design editor (product.md "Design"): recomputed on every keystroke. */
export function TheoryPanel({ draft }: { draft: TheoryDraft }) {
  const { game, delta } = draft;
  const deltaOk = typeof delta === 'number' && delta > 0 && delta < 1;
  const check = complete(game) ? checkStageGame(game, deltaOk ? delta : undefined) : null;
  if (!complete(game) || !check || check.errors.length > 0 || !deltaOk) {
    return (
      <section
        aria-labelledby="theory-title"
        className="flex flex-col gap-3 rounded-lg border border-slate-200 bg-white p-4"
        aria-live="polite"
      >
        <h2 id="theory-title" className="text-lg font-semibold">
          Theory
        </h2>
        <p className="text-slate-700">Enter payoffs with T &gt; R &gt; P &gt; S and a δ between 0 and 1 to see the thresholds.</p>
        {check?.errors.length ? (
          <ul className="list-inside list-disc text-sm text-slate-700">
            {check.errors.map((e) => (
              <li key={e.field + e.message}>{e.message}</li>
            ))}
          </ul>
        ) : null}
      </section>
    );
  }
  const t = theoryAt(game, delta);
  const tftSpeText = t.tftSPE.kind === 'knife-edge' ? `only at δ = ${fmt(t.tftSPE.delta, 4)}` : 'never (for these payoffs)';
  const rows: { name: string; condition: string; yes: boolean | 'tie'; source: string }[] = [
    { name: 'Grim trigger is subgame perfect', condition: `δ ≥ ${fmt(t.grimSPE)}`, yes: t.verdicts.grimSPE, source: 'Friedman (1971)' },
    {
      name: 'Tit-for-tat is a Nash equilibrium',
      condition:
        t.tftNash.threshold < 1
          ? `δ ≥ ${fmt(t.tftNash.threshold)} (binding: ${t.tftNash.binding === 'alternate' ? 'alternating' : 'defecting forever'})`
          : 'never',
      yes: t.verdicts.tftNash,
      source: 'Axelrod (1981, 1984)',
    },
    { name: 'Tit-for-tat is subgame perfect', condition: tftSpeText, yes: t.verdicts.tftSPE, source: 'Kalai, Samet & Stanford (1988)' },
    {
      name: 'Win-stay, lose-shift is subgame perfect',
      condition: t.wslsSPE === null ? 'never (needs 2R > T + P)' : `δ ≥ ${fmt(t.wslsSPE)}`,
      yes: t.verdicts.wslsSPE,
      source: 'one-shot deviation',
    },
    {
      name: 'Grim risk-dominates always-defect',
      condition: `δ ≥ ${fmt(t.riskDominance)}`,
      yes: t.verdicts.basin === 'tie' ? 'tie' : t.verdicts.riskDominant,
      source: 'Blonski, Ockenfels & Spagnolo (2011)',
    },
  ];
  const supergames = draft.supergames && draft.supergames > 0 ? draft.supergames : null;
  const seconds = draft.roundSeconds && draft.roundSeconds > 0 ? draft.roundSeconds : null;
  const plan = supergames && seconds ? classTimePlanner({ supergames, delta, secondsPerRound: seconds }) : null;
  const block =
    draft.termination.kind === 'block' && draft.termination.k && draft.termination.k >= 1
      ? blockTermination(delta, draft.termination.k)
      : null;
  return (
    <section aria-labelledby="theory-title" className="flex flex-col gap-4 rounded-lg border border-slate-200 bg-white p-4">
      <h2 id="theory-title" className="text-lg font-semibold">
        Theory at δ = {fmt(delta, 4)}
      </h2>
      {check.warnings.length ? (
        <ul className="flex flex-col gap-1 rounded border border-amber-300 bg-warn-50 p-3 text-sm">
          {check.warnings.map((w) => (
            <li key={w.message} className="flex gap-2">
              <span aria-hidden="true">⚠</span>
              {w.message}
            </li>
          ))}
        </ul>
      ) : null}
      <table className="w-full text-sm" aria-label="Thresholds and verdicts at the chosen δ">
        <thead className="text-left text-slate-600">
          <tr>
            <th scope="col" className="py-1 pr-2 font-semibold">
              Condition
            </th>
            <th scope="col" className="py-1 pr-2 font-semibold">
              Holds when
            </th>
            <th scope="col" className="py-1 font-semibold">
              At this δ
            </th>
          </tr>
        </thead>
        <tbody data-testid="verdicts">
          {rows.map((r) => (
            <tr key={r.name} className="border-t border-slate-100 align-top" data-verdict={verdictOf(r.yes)}>
              <th scope="row" className="py-2 pr-2 text-left font-normal">
                {r.name}
                <span className="block text-xs text-slate-500">{r.source}</span>
              </th>
              <td className="num py-2 pr-2">{r.condition}</td>
              <td className="py-2">
                <Verdict value={verdictOf(r.yes)} />
              </td>
            </tr>
          ))}
          <tr className="border-t border-slate-100 align-top">
            <th scope="row" className="py-2 pr-2 text-left font-normal">
              Basin of attraction of always-defect (sizeBAD)
              <span className="block text-xs text-slate-500">Dal Bó &amp; Fréchette (2011)</span>
            </th>
            <td className="num py-2 pr-2">{fmt(t.sizeBAD)}</td>
            <td className="py-2 text-slate-700" data-basin={t.verdicts.basin}>
              {basinWords(t.verdicts.basin)}
            </td>
          </tr>
        </tbody>
      </table>
      <ThresholdChart game={game} theory={t} />
      <div className="flex flex-col gap-2">
        <h3 className="font-semibold">Supergame length</h3>
        <p className="num text-sm text-slate-700">
          Expected {fmt(expectedLength(delta), 2)} rounds · median {medianLength(delta)} · P(≥ 5 rounds) = {fmt(pLengthAtLeast(delta, 5))} ·
          P(≥ 10 rounds) = {fmt(pLengthAtLeast(delta, 10))}
        </p>
        <LengthChart delta={delta} />
        {block ? (
          <p className="num text-sm text-slate-700">
            Blocks of {draft.termination.kind === 'block' ? draft.termination.k : ''}: on average {fmt(block.expectedRoundsPlayed, 2)}{' '}
            rounds played and {fmt(block.expectedPaidRounds, 2)} paid per supergame.
          </p>
        ) : null}
      </div>
      <div className="flex flex-col gap-1">
        <h3 className="font-semibold">Class time</h3>
        {plan ? (
          <p className="text-sm text-slate-700" data-testid="planner">
            {plan.sentence} (± {fmt(plan.sdMinutes, 0)} min, one SD).
          </p>
        ) : (
          <p className="text-sm text-slate-600">Enter the number of supergames and the round timer.</p>
        )}
      </div>
    </section>
  );
}
