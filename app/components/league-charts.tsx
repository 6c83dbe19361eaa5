// The league's evolution chart (recharts): each entry's population share over the generations of
// the replicator dynamics. A league may have 200 entries; the chart draws the few with the largest
// final share and folds the rest into one "all others" line, so it stays legible on a phone and
// from the back row. Lines differ by dash pattern and marker as well as shade, never by colour alone.
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';

export type Theme = 'light' | 'dark';

const PALETTE = {
  light: {
    series: ['#0e5357', '#b45309', '#475569', '#1d4ed8', '#7c2d12', '#0a3639'],
    others: '#94a3b8',
    grid: '#e2e8f0',
    text: '#334155',
  },
  dark: { series: ['#6fbcbe', '#fbbf24', '#f1f5f9', '#93c5fd', '#fca5a5', '#a8d8d9'], others: '#64748b', grid: '#334155', text: '#e2e8f0' },
} as const;
const DASHES = ['', '10 5', '4 4', '14 4 3 4', '2 3', '8 3 2 3 2 3'];

export const sharePct = (x: number) => `${(x * 100).toFixed(x >= 0.1 ? 0 : 1)} %`;

export interface EvolutionInput {
  /** one name per entry */
  names: readonly string[];
  /** shares[g][k]: share of entry k in generation g (generation 0 is the start) */
  shares: readonly (readonly number[])[];
}

export interface EvolutionSeries {
  /** the entries drawn, largest final share first */
  lines: { entry: number; name: string; final: number }[];
  /** how many entries are folded into "all others" (0: none) */
  othersCount: number;
  /** chart rows: { g, e<k>: share, others: share } */
  rows: Record<string, number>[];
}

/**
 * The entries worth a line of their own: the `max` largest final shares (those at or above
 * `threshold` at the end); the others summed into one line. Rows are thinned to at most `points`
 * generations (the first and the last always kept) so a long run draws quickly.
 */
export function evolutionSeries({ names, shares }: EvolutionInput, max = 6, threshold = 1e-3, points = 200): EvolutionSeries {
  const last = shares[shares.length - 1] ?? [];
  const ranked = last
    .map((final, entry) => ({ entry, name: names[entry] ?? `Entry ${entry + 1}`, final }))
    .sort((p, q) => q.final - p.final || p.entry - q.entry);
  const lines = ranked.filter((r, k) => k < max && (r.final >= threshold || k === 0));
  const drawn = new Set(lines.map((l) => l.entry));
  const othersCount = names.length - lines.length;
  const step = Math.max(1, Math.ceil(shares.length / points));
  const rows: Record<string, number>[] = [];
  shares.forEach((gen, g) => {
    if (g % step !== 0 && g !== shares.length - 1) return;
    const row: Record<string, number> = { g };
    let others = 0;
    gen.forEach((x, k) => {
      if (drawn.has(k)) row[`e${k}`] = x;
      else others += x;
    });
    if (othersCount > 0) row.others = others;
    rows.push(row);
  });
  return { lines, othersCount, rows };
}

export function EvolutionChart({
  evolution,
  theme = 'light',
  big = false,
  highlight,
  height = 'h-72',
}: {
  evolution: EvolutionInput;
  theme?: Theme;
  big?: boolean;
  /** an entry drawn thicker (the participant's own) */
  highlight?: number;
  height?: string;
}) {
  const p = PALETTE[theme];
  const { lines, othersCount, rows } = evolutionSeries(evolution);
  const generations = evolution.shares.length - 1;
  const font = big ? 22 : 12;
  const summary = `Population shares over ${generations} generations. At the end: ${lines.map((l) => `${l.name} ${sharePct(l.final)}`).join(', ')}${
    othersCount
      ? `; ${othersCount} other entr${othersCount === 1 ? 'y' : 'ies'} together ${sharePct(1 - lines.reduce((s, l) => s + l.final, 0))}`
      : ''
  }.`;
  return (
    <div className={`w-full ${height}`} role="img" aria-label={summary} data-testid="evolution-chart">
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={rows} margin={{ top: 8, right: 16, bottom: big ? 24 : 16, left: 0 }}>
          <CartesianGrid stroke={p.grid} strokeDasharray="3 3" />
          <XAxis
            dataKey="g"
            type="number"
            domain={[0, generations]}
            tick={{ fontSize: font, fill: p.text }}
            stroke={p.grid}
            label={{ value: 'Generation', position: 'insideBottom', offset: big ? -14 : -8, fill: p.text, fontSize: font }}
          />
          <YAxis
            domain={[0, 1]}
            ticks={[0, 0.25, 0.5, 0.75, 1]}
            tickFormatter={(v: number) => `${Math.round(v * 100)} %`}
            tick={{ fontSize: font, fill: p.text }}
            stroke={p.grid}
            width={big ? 84 : 48}
          />
          <Tooltip
            formatter={(v) => (typeof v === 'number' ? sharePct(v) : String(v))}
            labelFormatter={(g) => `Generation ${g}`}
            contentStyle={{ background: theme === 'dark' ? '#0f172a' : '#fff', color: p.text, borderColor: p.grid }}
          />
          <Legend wrapperStyle={{ fontSize: big ? 24 : 13, color: p.text }} />
          {lines.map((l, i) => (
            <Line
              key={l.entry}
              dataKey={`e${l.entry}`}
              name={l.name}
              type="monotone"
              dot={false}
              isAnimationActive={false}
              stroke={p.series[i % p.series.length]}
              strokeDasharray={DASHES[i % DASHES.length] || undefined}
              strokeWidth={(big ? 4 : 2) + (l.entry === highlight ? 2 : 0)}
            />
          ))}
          {othersCount > 0 ? (
            <Line
              dataKey="others"
              name={`all ${othersCount} others`}
              type="monotone"
              dot={false}
              isAnimationActive={false}
              stroke={p.others}
              strokeDasharray="1 4"
              strokeWidth={big ? 3 : 1.5}
            />
          ) : null}
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}
