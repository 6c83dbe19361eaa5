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

/**
 * What the chart draws, small enough to send to a phone: a few lines and the generations kept.
 * `shares[r]` holds one share per line, then (when `folded` > 0) the sum of the folded entries.
 */
export interface CompactEvolution {
  /** the name of each line, largest final share first */
  names: string[];
  /** the entry (index in the league's list) each line is */
  entries: number[];
  /** the generation of each row kept */
  generation: number[];
  shares: number[][];
  /** how many entries are summed in the last column (0: none) */
  folded: number;
}

const isCompact = (e: EvolutionInput | CompactEvolution): e is CompactEvolution => 'folded' in e;

/**
 * The entries worth a line of their own: the `max` largest final shares (those at or above
 * `threshold` at the end; the largest always); the others summed into one column. Rows are
 * thinned to at most about `points` generations, the first and the last always kept.
 */
export function compactEvolution(input: EvolutionInput | CompactEvolution, max = 6, threshold = 1e-3, points = 200): CompactEvolution {
  if (isCompact(input)) return input;
  const { names, shares } = input;
  const last = shares[shares.length - 1] ?? [];
  const lines = last
    .map((final, entry) => ({ entry, final }))
    .sort((p, q) => q.final - p.final || p.entry - q.entry)
    .filter((r, k) => k < max && (r.final >= threshold || k === 0));
  const drawn = new Set(lines.map((l) => l.entry));
  const folded = names.length - lines.length;
  const step = Math.max(1, Math.ceil(shares.length / points));
  const out: CompactEvolution = {
    names: lines.map((l) => names[l.entry] ?? `Entry ${l.entry + 1}`),
    entries: lines.map((l) => l.entry),
    generation: [],
    shares: [],
    folded,
  };
  shares.forEach((gen, g) => {
    if (g % step !== 0 && g !== shares.length - 1) return;
    const row = lines.map((l) => gen[l.entry]);
    if (folded > 0) row.push(gen.reduce((s, x, k) => (drawn.has(k) ? s : s + x), 0));
    out.generation.push(g);
    out.shares.push(row);
  });
  return out;
}

/** "TFT 61 %, Grim 39 %" for a list of survivors. */
export const sharesInWords = (list: readonly { name: string; share: number }[]) =>
  list.map((s) => `${s.name} ${sharePct(s.share)}`).join(', ');

export function EvolutionChart({
  evolution,
  theme = 'light',
  big = false,
  highlight,
  height = 'h-72',
}: {
  evolution: EvolutionInput | CompactEvolution;
  theme?: Theme;
  big?: boolean;
  /** an entry (index in the league's list) drawn thicker: the participant's own */
  highlight?: number;
  height?: string;
}) {
  const p = PALETTE[theme];
  const c = compactEvolution(evolution);
  const rows = c.generation.map((g, r) => {
    const row: Record<string, number> = { g };
    c.names.forEach((_, k) => (row[`l${k}`] = c.shares[r][k]));
    if (c.folded) row.others = c.shares[r][c.names.length];
    return row;
  });
  const generations = c.generation[c.generation.length - 1] ?? 0;
  const final = c.shares[c.shares.length - 1] ?? [];
  const font = big ? 22 : 12;
  const summary = `Population shares over ${generations} generations. At the end: ${sharesInWords(c.names.map((name, k) => ({ name, share: final[k] })))}${
    c.folded ? `; ${c.folded} other entr${c.folded === 1 ? 'y' : 'ies'} together ${sharePct(final[c.names.length])}` : ''
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
          <Legend verticalAlign="top" wrapperStyle={{ fontSize: big ? 24 : 13, color: p.text, paddingBottom: 8 }} />
          {c.names.map((name, i) => (
            <Line
              key={c.entries[i]}
              dataKey={`l${i}`}
              name={name}
              type="monotone"
              dot={false}
              isAnimationActive={false}
              stroke={p.series[i % p.series.length]}
              strokeDasharray={DASHES[i % DASHES.length] || undefined}
              strokeWidth={(big ? 4 : 2) + (c.entries[i] === highlight ? 2 : 0)}
            />
          ))}
          {c.folded > 0 ? (
            <Line
              dataKey="others"
              name={c.folded === 1 ? '1 other entry' : `${c.folded} other entries together`}
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
