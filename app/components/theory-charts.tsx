import { Bar, BarChart, CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { StageGame } from '#app/lib/stage-game';
import { lengthTable } from '#app/lib/termination';
import { sizeBAD, type TheoryAt } from '#app/lib/thresholds';

const fmt = (x: number, d = 3) => String(Number(x.toFixed(d)));
const ACCENT = '#0e5357';
const GREY = '#475569';

/**
 * The thresholds on a δ axis with the chosen δ marked, over the size of the basin of attraction
 * of always-defect against grim (Dal Bó & Fréchette 2011, 2018): lines are told apart by dash
 * pattern and label, not colour alone.
 */
export function ThresholdChart({ game, theory }: { game: StageGame; theory: TheoryAt }) {
  const points = Array.from({ length: 99 }, (_, i) => {
    const delta = (i + 1) / 100;
    return { delta, sizeBAD: sizeBAD(game, delta) };
  });
  const lines: { x: number; label: string; dash: string }[] = [
    { x: theory.grimSPE, label: 'Grim SPE', dash: '6 3' },
    { x: theory.riskDominance, label: 'δ_RD', dash: '2 3' },
  ];
  if (theory.tftNash.threshold < 1 && Math.abs(theory.tftNash.threshold - theory.grimSPE) > 1e-9) {
    lines.push({ x: theory.tftNash.threshold, label: 'TFT Nash', dash: '8 2 2 2' });
  }
  if (theory.wslsSPE !== null && theory.wslsSPE < 1) lines.push({ x: theory.wslsSPE, label: 'WSLS SPE', dash: '1 2' });
  const summary = `Thresholds on the δ axis: ${lines.map((l) => `${l.label} ${fmt(l.x)}`).join(', ')}; chosen δ ${fmt(theory.delta)}; sizeBAD at δ ${fmt(theory.sizeBAD)}.`;
  return (
    <figure className="flex flex-col gap-2">
      <div className="h-64 w-full" role="img" aria-label={summary}>
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={points} margin={{ top: 24, right: 16, bottom: 8, left: 0 }}>
            <CartesianGrid stroke="#e2e8f0" />
            <XAxis
              dataKey="delta"
              type="number"
              domain={[0, 1]}
              ticks={[0, 0.2, 0.4, 0.6, 0.8, 1]}
              tick={{ fontSize: 12 }}
              label={{ value: 'δ', position: 'insideBottomRight', offset: -4 }}
            />
            <YAxis domain={[0, 1]} ticks={[0, 0.5, 1]} tick={{ fontSize: 12 }} width={36} />
            <Tooltip formatter={(v) => fmt(Number(v))} labelFormatter={(l) => `δ = ${fmt(Number(l), 2)}`} />
            <ReferenceLine y={0.5} stroke="#94a3b8" strokeDasharray="3 3" />
            {lines.map((l, i) => (
              <ReferenceLine
                key={l.label}
                x={l.x}
                stroke={GREY}
                strokeDasharray={l.dash}
                label={{ value: l.label, position: i % 2 ? 'insideTopLeft' : 'top', fontSize: 11, fill: GREY }}
              />
            ))}
            <ReferenceLine
              x={theory.delta}
              stroke={ACCENT}
              strokeWidth={3}
              label={{ value: `δ = ${fmt(theory.delta)}`, position: 'insideBottomLeft', fontSize: 12, fill: ACCENT, fontWeight: 700 }}
            />
            <Line type="monotone" dataKey="sizeBAD" name="sizeBAD" stroke={ACCENT} dot={false} strokeWidth={2} isAnimationActive={false} />
          </LineChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-sm text-slate-600">
        Curve: size of the basin of attraction of always-defect against grim (sizeBAD; 1 below the grim threshold, under ½ beyond δ_RD).
        Vertical lines: thresholds; thick line: the chosen δ.
      </figcaption>
    </figure>
  );
}

/** P(L = k): the geometric law of supergame lengths at δ (methods.md §2). */
export function LengthChart({ delta }: { delta: number }) {
  let kMax = 1;
  while (kMax < 30 && Math.pow(delta, kMax) > 0.01) kMax++;
  const rows = lengthTable(delta, kMax).map((r) => ({ k: r.k, p: r.exactly }));
  return (
    <div
      className="h-40 w-full"
      role="img"
      aria-label={`Chance that a supergame lasts exactly k rounds, k = 1 to ${kMax}: ${rows
        .slice(0, 5)
        .map((r) => `${r.k}: ${fmt(r.p)}`)
        .join(', ')} …`}
    >
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={rows} margin={{ top: 8, right: 8, bottom: 8, left: 0 }}>
          <CartesianGrid stroke="#e2e8f0" vertical={false} />
          <XAxis dataKey="k" tick={{ fontSize: 12 }} label={{ value: 'rounds', position: 'insideBottomRight', offset: -4 }} />
          <YAxis tick={{ fontSize: 12 }} width={36} />
          <Tooltip formatter={(v) => fmt(Number(v))} labelFormatter={(l) => `exactly ${l} round${Number(l) === 1 ? '' : 's'}`} />
          <Bar dataKey="p" name="P(L = k)" fill={ACCENT} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}
