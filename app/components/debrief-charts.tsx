// The Debrief's charts (recharts), each in a frame with its title, a short text summary for screen
// readers and a "download data (CSV)" link beside it. One session or several overlaid: series are
// told apart by marker shape, dash pattern and legend label, never by colour alone. `theme="dark"`
// is the projector's high-contrast look.
import type { ReactNode } from 'react';
import { Link } from 'react-router';
import {
  Bar,
  BarChart,
  CartesianGrid,
  ComposedChart,
  ErrorBar,
  Legend,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { ChartId, TableSession } from '#app/lib/debrief-tables';
import { pointsBins, sizeBadCurve } from '#app/lib/debrief-tables';
import { grimSPE, riskDominance } from '#app/lib/thresholds';
import { cx } from './ui';

export type Theme = 'light' | 'dark';

const PALETTE = {
  light: { series: ['#0e5357', '#475569', '#0a3639', '#94a3b8'], grid: '#e2e8f0', text: '#334155', ref: '#475569', tooltipBg: '#fff' },
  dark: { series: ['#6fbcbe', '#f1f5f9', '#a8d8d9', '#cbd5e1'], grid: '#334155', text: '#e2e8f0', ref: '#cbd5e1', tooltipBg: '#0f172a' },
} as const;
const SHAPES = ['circle', 'square', 'triangle', 'diamond'] as const;
const SHAPE_WORDS = { circle: '●', square: '■', triangle: '▲', diamond: '◆' } as const;
const DASHES = ['', '8 4', '3 3', '12 4 3 4'];

export const pct = (x: number | null | undefined, d = 0) =>
  x === null || x === undefined ? '–' : `${(x * 100).toFixed(d).replace(/^-(0(\.0+)?)$/, '$1')} %`;
const PCT_TICKS = [0, 0.25, 0.5, 0.75, 1];
const fmt = (x: number, d = 3) => String(Number(x.toFixed(d)));

/** The outline of a marker shape centred on (x, y), half-size s. */
function shapePath(shape: (typeof SHAPES)[number], x: number, y: number, s: number) {
  return shape === 'circle'
    ? `M ${x - s} ${y} a ${s} ${s} 0 1 0 ${2 * s} 0 a ${s} ${s} 0 1 0 ${-2 * s} 0`
    : shape === 'square'
      ? `M ${x - s} ${y - s} h ${2 * s} v ${2 * s} h ${-2 * s} z`
      : shape === 'triangle'
        ? `M ${x} ${y - s * 1.2} L ${x + s * 1.1} ${y + s} L ${x - s * 1.1} ${y + s} z`
        : `M ${x} ${y - s * 1.3} L ${x + s * 1.3} ${y} L ${x} ${y + s * 1.3} L ${x - s * 1.3} ${y} z`;
}

/** The marker of series i, drawn by recharts at each point. */
function marker(i: number, color: string, size: number) {
  const shape = SHAPES[i % SHAPES.length];
  return function Marker(props: { cx?: number; cy?: number; index?: number }) {
    const { cx: x, cy: y, index } = props;
    if (x === undefined || y === undefined || Number.isNaN(x) || Number.isNaN(y)) return <g key={`m${i}-${index}`} />;
    return <path key={`m${i}-${index}`} d={shapePath(shape, x, y, size)} fill={color} stroke={color} />;
  };
}

/** Hatch patterns so that bars of different sessions differ in texture as well as shade. */
function Patterns({ theme, count }: { theme: Theme; count: number }) {
  const p = PALETTE[theme];
  return (
    <defs>
      {Array.from({ length: count }, (_, i) => (
        <pattern
          key={i}
          id={`fill-${theme}-${i}`}
          patternUnits="userSpaceOnUse"
          width="8"
          height="8"
          patternTransform={`rotate(${i === 1 ? 45 : i === 2 ? -45 : 0})`}
        >
          <rect width="8" height="8" fill={p.series[i % p.series.length]} opacity={i === 0 ? 1 : 0.35} />
          {i > 0 ? <line x1="0" y1="0" x2="0" y2="8" stroke={p.series[i % p.series.length]} strokeWidth="4" /> : null}
        </pattern>
      ))}
    </defs>
  );
}
const fillOf = (theme: Theme, i: number) => `url(#fill-${theme}-${i})`;

/** The y axis of a share (0–100 %), as every share chart draws it. */
function shareAxisProps(theme: Theme, big: boolean) {
  return {
    domain: [0, 1] as [number, number],
    ticks: PCT_TICKS,
    allowDataOverflow: true,
    tickFormatter: (v: number) => pct(v),
    width: big ? 80 : 52,
    ...axisProps(theme, big),
  };
}

function axisProps(theme: Theme, big: boolean) {
  return { tick: { fontSize: big ? 20 : 12, fill: PALETTE[theme].text }, stroke: PALETTE[theme].grid };
}
function tooltipProps(theme: Theme) {
  const p = PALETTE[theme];
  return { contentStyle: { background: p.tooltipBg, color: p.text, borderColor: p.grid }, labelStyle: { color: p.text } };
}
// The padding keeps a key that wraps to two lines on a phone clear of the top tick label, which
// sticks out half its height above the plot.
const legendProps = (theme: Theme, big: boolean) => ({
  wrapperStyle: { fontSize: big ? 20 : 13, color: PALETTE[theme].text, paddingTop: big ? 6 : 4, paddingBottom: big ? 16 : 10 },
});

/**
 * One legend entry: a session (or group) in its colour, marker shape, dash or hatch, or, when
 * `neutral`, what a line style or bar means for every session (drawn in the reference grey).
 */
interface KeyEntry {
  label: string;
  /** series index: colour, marker shape and hatch */
  i: number;
  kind: 'line' | 'bar' | 'marker' | 'bar+line';
  dash?: string;
  neutral?: boolean;
}

function Swatch({ entry, theme, big }: { entry: KeyEntry; theme: Theme; big: boolean }) {
  const p = PALETTE[theme];
  const color = entry.neutral ? p.ref : p.series[entry.i % p.series.length];
  const h = big ? 20 : 12;
  const bar = (
    <rect
      x={1}
      y={1}
      width={h - 2}
      height={h - 2}
      fill={entry.neutral ? 'none' : fillOf(theme, entry.i)}
      stroke={color}
      strokeWidth={entry.neutral ? 1.5 : 1}
    />
  );
  const lineX = entry.kind === 'bar+line' ? h + 2 : 0;
  const line = (
    <>
      <line
        x1={lineX}
        x2={lineX + 2.4 * h}
        y1={h / 2}
        y2={h / 2}
        stroke={color}
        strokeWidth={big ? 3 : 2}
        strokeDasharray={entry.dash || undefined}
      />
      {entry.neutral ? null : (
        <path d={shapePath(SHAPES[entry.i % SHAPES.length], lineX + 1.2 * h, h / 2, h / 3)} fill={color} stroke={color} />
      )}
    </>
  );
  const width = entry.kind === 'bar' || entry.kind === 'marker' ? h : entry.kind === 'line' ? 2.4 * h : 3.4 * h + 2;
  return (
    <svg aria-hidden="true" width={width} height={h} className="shrink-0 overflow-visible">
      {entry.kind === 'bar' || entry.kind === 'bar+line' ? bar : null}
      {entry.kind === 'line' || entry.kind === 'bar+line' ? line : null}
      {entry.kind === 'marker' ? (
        <path d={shapePath(SHAPES[entry.i % SHAPES.length], h / 2, h / 2, h / 3)} fill={color} stroke={color} />
      ) : null}
    </svg>
  );
}

/** The chart's key, rendered by recharts' Legend so it takes its own room above the plot. */
function keyLegend(entries: KeyEntry[], theme: Theme, big: boolean) {
  return {
    ...legendProps(theme, big),
    content: () => (
      <ul className="flex flex-wrap justify-center gap-x-5 gap-y-1 px-2 leading-tight">
        {entries.map((e) => (
          <li key={`${e.label}-${e.i}-${e.kind}`} className="inline-flex min-w-0 items-center gap-1.5">
            <Swatch entry={e} theme={theme} big={big} />
            <span>{e.label}</span>
          </li>
        ))}
      </ul>
    ),
  };
}

const sessionLabel = (s: TableSession) => `#${s.id} ${s.treatment}`;
const sessionKeys = (sessions: TableSession[], kind: KeyEntry['kind'], dash?: (i: number) => string) =>
  sessions.map((s, i): KeyEntry => ({ label: sessionLabel(s), i, kind, dash: dash?.(i) }));

export interface ChartProps {
  sessions: TableSession[];
  theme?: Theme;
  /** projector: large type */
  big?: boolean;
}

const key = (s: { id: number }, what: string) => `s${s.id}_${what}`;
const seriesName = (s: TableSession, i: number, what?: string) =>
  `${SHAPE_WORDS[SHAPES[i % SHAPES.length]]} #${s.id} ${s.treatment}${what ? ` — ${what}` : ''}`;

/** Rows keyed by x, one column per session and measure, for overlaid lines. */
function mergeBy<T>(
  sessions: TableSession[],
  rowsOf: (s: TableSession) => T[],
  x: (r: T) => number,
  cols: (r: T) => Record<string, number | null>,
) {
  const byX = new Map<number, Record<string, number | null>>();
  for (const s of sessions)
    for (const r of rowsOf(s)) {
      const row = byX.get(x(r)) ?? { x: x(r) };
      for (const [k, v] of Object.entries(cols(r))) row[key(s, k)] = v;
      byX.set(x(r), row);
    }
  return [...byX.values()].sort((a, b) => (a.x as number) - (b.x as number));
}

export function CoopBySupergameChart({ sessions, theme = 'light', big = false }: ChartProps) {
  const p = PALETTE[theme];
  const data = mergeBy(
    sessions,
    (s) => s.debrief.bySupergame,
    (g) => g.supergame,
    (g) => ({ all: g.all.rate, r1: g.round1.rate }),
  );
  return (
    <ResponsiveContainer width="100%" height="100%">
      <LineChart data={data} margin={{ top: 16, right: 24, bottom: 24, left: 8 }}>
        <CartesianGrid stroke={p.grid} />
        <XAxis
          dataKey="x"
          type="number"
          domain={['dataMin', 'dataMax']}
          allowDecimals={false}
          {...axisProps(theme, big)}
          label={{ value: 'supergame', position: 'insideBottom', offset: -12, fill: p.text, fontSize: big ? 20 : 12 }}
        />
        <YAxis {...shareAxisProps(theme, big)} />
        <Tooltip formatter={(v) => pct(Number(v), 1)} labelFormatter={(l) => `supergame ${l}`} {...tooltipProps(theme)} />
        <Legend
          verticalAlign="top"
          {...keyLegend(
            [
              ...sessionKeys(sessions, 'line'),
              { label: 'all rounds', i: 0, kind: 'line', neutral: true },
              { label: 'round 1', i: 0, kind: 'line', dash: '6 4', neutral: true },
            ],
            theme,
            big,
          )}
        />
        {sessions.flatMap((s, i) => [
          <Line
            key={key(s, 'all')}
            dataKey={key(s, 'all')}
            name={seriesName(s, i, 'all rounds')}
            stroke={p.series[i % 4]}
            strokeWidth={big ? 4 : 2}
            dot={marker(i, p.series[i % 4], big ? 6 : 4)}
            isAnimationActive={false}
            connectNulls
          />,
          <Line
            key={key(s, 'r1')}
            dataKey={key(s, 'r1')}
            name={seriesName(s, i, 'round 1')}
            stroke={p.series[i % 4]}
            strokeDasharray="6 4"
            strokeWidth={big ? 3 : 1.5}
            dot={false}
            isAnimationActive={false}
            connectNulls
          />,
        ])}
      </LineChart>
    </ResponsiveContainer>
  );
}

export function CoopByRoundChart({ sessions, theme = 'light', big = false }: ChartProps) {
  const p = PALETTE[theme];
  const data = mergeBy(
    sessions,
    (s) => s.debrief.byRound,
    (r) => r.round,
    (r) => ({ all: r.all.rate, n: r.supergames }),
  );
  return (
    <ResponsiveContainer width="100%" height="100%">
      <LineChart data={data} margin={{ top: 16, right: 24, bottom: 24, left: 8 }}>
        <CartesianGrid stroke={p.grid} />
        <XAxis
          dataKey="x"
          type="number"
          domain={[1, 'dataMax']}
          allowDecimals={false}
          {...axisProps(theme, big)}
          label={{ value: 'round within the supergame', position: 'insideBottom', offset: -12, fill: p.text, fontSize: big ? 20 : 12 }}
        />
        <YAxis {...shareAxisProps(theme, big)} />
        <Tooltip
          formatter={(v, name) => (String(name).includes('supergames') ? String(v) : pct(Number(v), 1))}
          labelFormatter={(l) => `round ${l}`}
          {...tooltipProps(theme)}
        />
        <Legend
          verticalAlign="top"
          {...keyLegend(
            sessionKeys(sessions, 'line', (i) => DASHES[i % 4]),
            theme,
            big,
          )}
        />
        {sessions.map((s, i) => (
          <Line
            key={key(s, 'all')}
            dataKey={key(s, 'all')}
            name={seriesName(s, i)}
            stroke={p.series[i % 4]}
            strokeDasharray={DASHES[i % 4]}
            strokeWidth={big ? 4 : 2}
            dot={marker(i, p.series[i % 4], big ? 6 : 4)}
            isAnimationActive={false}
            connectNulls
          />
        ))}
      </LineChart>
    </ResponsiveContainer>
  );
}

const OUTCOMES = [
  { key: 'both', label: 'both cooperate' },
  { key: 'one', label: 'one cooperates' },
  { key: 'none', label: 'neither cooperates' },
] as const;

/** One session: stacked shares by supergame. Several: each session's overall shares side by side. */
export function OutcomesChart({ sessions, theme = 'light', big = false }: ChartProps) {
  const p = PALETTE[theme];
  if (sessions.length === 1) {
    const data = sessions[0].debrief.bySupergame.map((g) => ({ x: g.supergame, ...g.outcomes }));
    return (
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 16, right: 24, bottom: 24, left: 8 }}>
          <Patterns theme={theme} count={3} />
          <CartesianGrid stroke={p.grid} vertical={false} />
          <XAxis
            dataKey="x"
            {...axisProps(theme, big)}
            label={{ value: 'supergame', position: 'insideBottom', offset: -12, fill: p.text, fontSize: big ? 20 : 12 }}
          />
          <YAxis {...shareAxisProps(theme, big)} />
          <Tooltip formatter={(v) => pct(Number(v), 1)} labelFormatter={(l) => `supergame ${l}`} {...tooltipProps(theme)} />
          <Legend
            verticalAlign="top"
            {...keyLegend(
              OUTCOMES.map((o, i) => ({ label: o.label, i, kind: 'bar' })),
              theme,
              big,
            )}
          />
          {OUTCOMES.map((o, i) => (
            <Bar
              key={o.key}
              dataKey={o.key}
              name={o.label}
              stackId="o"
              fill={fillOf(theme, i)}
              stroke={p.series[i]}
              isAnimationActive={false}
            />
          ))}
        </BarChart>
      </ResponsiveContainer>
    );
  }
  const data = OUTCOMES.map((o) => {
    const row: Record<string, string | number> = { x: o.label };
    for (const s of sessions) {
      const n = s.debrief.bySupergame.reduce((t, g) => t + g.outcomes.n, 0);
      row[key(s, 'share')] = n ? s.debrief.bySupergame.reduce((t, g) => t + g.outcomes[o.key] * g.outcomes.n, 0) / n : 0;
    }
    return row;
  });
  return (
    <ResponsiveContainer width="100%" height="100%">
      <BarChart data={data} margin={{ top: 16, right: 24, bottom: 8, left: 8 }}>
        <Patterns theme={theme} count={sessions.length} />
        <CartesianGrid stroke={p.grid} vertical={false} />
        <XAxis dataKey="x" {...axisProps(theme, big)} />
        <YAxis {...shareAxisProps(theme, big)} />
        <Tooltip formatter={(v) => pct(Number(v), 1)} {...tooltipProps(theme)} />
        <Legend verticalAlign="top" {...keyLegend(sessionKeys(sessions, 'bar'), theme, big)} />
        {sessions.map((s, i) => (
          <Bar
            key={s.id}
            dataKey={key(s, 'share')}
            name={seriesName(s, i)}
            fill={fillOf(theme, i)}
            stroke={p.series[i % 4]}
            isAnimationActive={false}
          />
        ))}
      </BarChart>
    </ResponsiveContainer>
  );
}

/** Share of supergames lasting k rounds (bars) against P(L = k) at each session's δ (lines). */
export function LengthsChart({ sessions, theme = 'light', big = false }: ChartProps) {
  const p = PALETTE[theme];
  const data = mergeBy(
    sessions,
    (s) => s.debrief.lengths.histogram.map((h) => ({ ...h, n: s.debrief.lengths.lengths.length })),
    (h) => h.k,
    (h) => ({ observed: h.observed / h.n, expected: h.expected / h.n }),
  );
  return (
    <ResponsiveContainer width="100%" height="100%">
      <ComposedChart data={data} margin={{ top: 16, right: 24, bottom: 24, left: 8 }}>
        <Patterns theme={theme} count={sessions.length} />
        <CartesianGrid stroke={p.grid} vertical={false} />
        <XAxis
          dataKey="x"
          {...axisProps(theme, big)}
          label={{ value: 'rounds in the supergame (L)', position: 'insideBottom', offset: -12, fill: p.text, fontSize: big ? 20 : 12 }}
        />
        <YAxis tickFormatter={(v) => pct(v)} width={big ? 80 : 52} {...axisProps(theme, big)} />
        <Tooltip formatter={(v) => pct(Number(v), 1)} labelFormatter={(l) => `L = ${l}`} {...tooltipProps(theme)} />
        <Legend
          verticalAlign="top"
          {...keyLegend(
            [
              ...sessions.map((s, i): KeyEntry => ({
                label: `${sessionLabel(s)}, δ = ${fmt(s.delta)}`,
                i,
                kind: 'bar+line',
                dash: DASHES[(i + 1) % 4],
              })),
              { label: 'bars: observed', i: 0, kind: 'bar', neutral: true },
              { label: 'lines: geometric law', i: 0, kind: 'line', neutral: true },
            ],
            theme,
            big,
          )}
        />
        {sessions.map((s, i) => (
          <Bar
            key={key(s, 'o')}
            dataKey={key(s, 'observed')}
            name={seriesName(s, i, 'observed')}
            fill={fillOf(theme, i)}
            stroke={p.series[i % 4]}
            isAnimationActive={false}
          />
        ))}
        {sessions.map((s, i) => (
          <Line
            key={key(s, 'e')}
            dataKey={key(s, 'expected')}
            name={`${seriesName(s, i)} — geometric law at δ = ${fmt(s.delta)}`}
            stroke={p.series[i % 4]}
            strokeDasharray={DASHES[(i + 1) % 4]}
            strokeWidth={big ? 3 : 2}
            dot={marker(i, p.series[i % 4], big ? 5 : 3)}
            isAnimationActive={false}
            connectNulls
          />
        ))}
      </ComposedChart>
    </ResponsiveContainer>
  );
}

export function PointsChart({ sessions, theme = 'light', big = false }: ChartProps) {
  const p = PALETTE[theme];
  const data = pointsBins(sessions);
  return (
    <ResponsiveContainer width="100%" height="100%">
      <BarChart data={data} margin={{ top: 16, right: 24, bottom: 24, left: 8 }}>
        <Patterns theme={theme} count={sessions.length} />
        <CartesianGrid stroke={p.grid} vertical={false} />
        <XAxis
          dataKey="bin"
          {...axisProps(theme, big)}
          label={{ value: 'points in the session', position: 'insideBottom', offset: -12, fill: p.text, fontSize: big ? 20 : 12 }}
        />
        <YAxis allowDecimals={false} width={big ? 64 : 40} {...axisProps(theme, big)} />
        <Tooltip labelFormatter={(l) => `${l} points`} {...tooltipProps(theme)} />
        <Legend verticalAlign="top" {...keyLegend(sessionKeys(sessions, 'bar'), theme, big)} />
        {sessions.map((s, i) => (
          <Bar
            key={s.id}
            dataKey={`s${s.id}`}
            name={`${seriesName(s, i)} — participants`}
            fill={fillOf(theme, i)}
            stroke={p.series[i % 4]}
            isAnimationActive={false}
          />
        ))}
      </BarChart>
    </ResponsiveContainer>
  );
}

/** Sessions grouped by payoff set: each set has its own sizeBAD curve and thresholds. */
export function payoffSets(sessions: readonly TableSession[]) {
  const sets = new Map<string, { payoffs: TableSession['payoffs']; ids: number[] }>();
  for (const s of sessions) {
    const k = JSON.stringify([s.payoffs.R, s.payoffs.S, s.payoffs.T, s.payoffs.P]);
    const set = sets.get(k) ?? { payoffs: s.payoffs, ids: [] };
    set.ids.push(s.id);
    sets.set(k, set);
  }
  return [...sets.values()].map((set) => ({
    ...set,
    label: `R${fmt(set.payoffs.R)} S${fmt(set.payoffs.S)} T${fmt(set.payoffs.T)} P${fmt(set.payoffs.P)}`,
    sessions: set.ids.map((id) => `#${id}`).join(', '),
  }));
}

/**
 * Cooperation (all rounds and round 1) of each session at its δ, over the size of the basin of
 * attraction of always-defect against grim, with δ_SPE and δ_RD (methods.md §1; Dal Bó &
 * Fréchette 2011, 2018; Blonski, Ockenfels & Spagnolo 2011). Each payoff set has its own curve
 * and thresholds: a session is read against the curve of its own payoffs, never another's.
 */
export function TheoryChart({ sessions, theme = 'light', big = false }: ChartProps) {
  const p = PALETTE[theme];
  const sets = payoffSets(sessions);
  const many = sets.length > 1;
  const curves = sets.map((set) => sizeBadCurve(set.payoffs));
  const data = curves[0].map((row, j) => Object.fromEntries([['delta', row.delta], ...curves.map((c, k) => [`bad${k}`, c[j].sizeBAD])]));
  const lines = sets.flatMap((set) => {
    const tag = many ? ` (${set.sessions})` : '';
    return [
      { x: grimSPE(set.payoffs), label: `δ_SPE ${fmt(grimSPE(set.payoffs), 2)}${tag}`, dash: '6 3' },
      { x: riskDominance(set.payoffs), label: `δ_RD ${fmt(riskDominance(set.payoffs), 2)}${tag}`, dash: '2 3' },
    ];
  });
  return (
    <ResponsiveContainer width="100%" height="100%">
      <ComposedChart data={data} margin={{ top: 32, right: 24, bottom: 24, left: 8 }}>
        <CartesianGrid stroke={p.grid} />
        <XAxis
          dataKey="delta"
          type="number"
          domain={[0, 1]}
          ticks={[0, 0.2, 0.4, 0.6, 0.8, 1]}
          {...axisProps(theme, big)}
          label={{ value: 'δ (chance of another round)', position: 'insideBottom', offset: -12, fill: p.text, fontSize: big ? 20 : 12 }}
        />
        <YAxis
          domain={[0, 1]}
          ticks={[0, 0.25, 0.5, 0.75, 1]}
          tickFormatter={(v) => fmt(v, 2)}
          width={big ? 64 : 44}
          {...axisProps(theme, big)}
        />
        <Tooltip formatter={(v) => fmt(Number(v))} labelFormatter={(l) => `δ = ${fmt(Number(l), 3)}`} {...tooltipProps(theme)} />
        <Legend
          verticalAlign="bottom"
          {...keyLegend(
            [
              ...sets.map((set, k): KeyEntry => ({
                label: many ? `sizeBAD at ${set.label} (${set.sessions})` : 'sizeBAD',
                i: k,
                kind: 'line',
                dash: DASHES[k % DASHES.length],
                neutral: true,
              })),
              ...sessionKeys(sessions, 'marker'),
            ],
            theme,
            big,
          )}
          wrapperStyle={{ ...legendProps(theme, big).wrapperStyle, paddingTop: big ? 40 : 24 }}
        />
        <ReferenceLine y={0.5} stroke={p.grid} strokeDasharray="3 3" />
        {lines.map((l, i) => (
          <ReferenceLine
            key={l.label}
            x={l.x}
            stroke={p.ref}
            strokeDasharray={l.dash}
            label={{ value: l.label, position: i % 2 ? 'insideTopLeft' : 'top', fontSize: big ? 18 : 11, fill: p.ref }}
          />
        ))}
        {sets.map((set, k) => (
          <Line
            key={`bad${k}`}
            dataKey={`bad${k}`}
            name={many ? `sizeBAD at ${set.label} (${set.sessions})` : 'sizeBAD (basin of always-defect vs grim)'}
            stroke={p.ref}
            strokeDasharray={DASHES[k % DASHES.length]}
            strokeWidth={big ? 3 : 1.5}
            dot={false}
            isAnimationActive={false}
          />
        ))}
        {sessions.map((s, i) => (
          <Scatter
            key={key(s, 'c')}
            name={`${seriesName(s, i)} — cooperation (all rounds ${pct(s.debrief.overall.rate)}, round 1 ${pct(s.debrief.overallRound1.rate)})`}
            data={[
              { delta: s.delta, coop: s.debrief.overall.rate },
              { delta: s.delta, coop: s.debrief.overallRound1.rate },
            ]}
            dataKey="coop"
            fill={p.series[i % 4]}
            shape={
              SHAPES[i % SHAPES.length] === 'square'
                ? 'square'
                : SHAPES[i % SHAPES.length] === 'triangle'
                  ? 'triangle'
                  : SHAPES[i % SHAPES.length] === 'diamond'
                    ? 'diamond'
                    : 'circle'
            }
            isAnimationActive={false}
          />
        ))}
      </ComposedChart>
    </ResponsiveContainer>
  );
}

export interface StrategyGroup {
  group: string;
  strategies: string[];
  shares: number[];
  se: number[] | null;
}

/** Estimated shares per treatment with ± 1 bootstrap standard error bars. */
export function StrategiesChart({ groups, theme = 'light', big = false }: { groups: StrategyGroup[]; theme?: Theme; big?: boolean }) {
  const p = PALETTE[theme];
  const strategies = groups[0]?.strategies ?? [];
  const data = strategies.map((id, k) => {
    const row: Record<string, string | number | null> = { x: id };
    groups.forEach((g, i) => {
      row[`g${i}`] = g.shares[k];
      row[`g${i}_se`] = g.se ? g.se[k] : 0;
    });
    return row;
  });
  return (
    <ResponsiveContainer width="100%" height="100%">
      <BarChart data={data} margin={{ top: 16, right: 24, bottom: 8, left: 8 }}>
        <Patterns theme={theme} count={groups.length} />
        <CartesianGrid stroke={p.grid} vertical={false} />
        <XAxis dataKey="x" {...axisProps(theme, big)} />
        <YAxis {...shareAxisProps(theme, big)} />
        <Tooltip formatter={(v) => pct(Number(v), 1)} {...tooltipProps(theme)} />
        <Legend
          verticalAlign="top"
          {...keyLegend(
            groups.map((g, i) => ({ label: g.group, i, kind: 'bar' })),
            theme,
            big,
          )}
        />
        {groups.map((g, i) => (
          <Bar
            key={g.group}
            dataKey={`g${i}`}
            name={`${SHAPE_WORDS[SHAPES[i % 4]]} ${g.group}`}
            fill={fillOf(theme, i)}
            stroke={p.series[i % 4]}
            isAnimationActive={false}
          >
            {g.se ? (
              <ErrorBar dataKey={`g${i}_se`} width={big ? 10 : 6} strokeWidth={big ? 3 : 2} stroke={p.text} isAnimationActive={false} />
            ) : null}
          </Bar>
        ))}
      </BarChart>
    </ResponsiveContainer>
  );
}

/** A chart with its title, text summary, CSV link and notes. */
export function ChartFrame({
  id,
  title,
  csvHref,
  summary,
  notes,
  children,
  theme = 'light',
  height = 'h-72',
}: {
  id: ChartId;
  title: string;
  csvHref: string;
  summary: string;
  notes?: ReactNode;
  children: ReactNode;
  theme?: Theme;
  height?: string;
}) {
  const dark = theme === 'dark';
  return (
    <figure
      data-chart={id}
      aria-labelledby={`chart-${id}`}
      className={cx('flex flex-col gap-2 rounded-lg border p-4', dark ? 'border-slate-700 bg-slate-950' : 'border-slate-200 bg-white')}
    >
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id={`chart-${id}`} className={cx('font-semibold', dark ? 'text-4xl text-white' : 'text-lg text-slate-900')}>
          {title}
        </h2>
        <a
          href={csvHref}
          download
          className={cx(
            'inline-flex min-h-11 items-center gap-1 rounded-md px-2 font-semibold underline-offset-4 hover:underline',
            dark ? 'text-accent-200' : 'text-accent-700',
          )}
        >
          <span aria-hidden="true">⤓</span> download data (CSV)<span className="sr-only"> of “{title}”</span>
        </a>
      </div>
      <div className={cx('w-full', height)} role="img" aria-label={summary}>
        {children}
      </div>
      <figcaption className={cx(dark ? 'text-2xl text-slate-200' : 'text-sm text-slate-600')}>
        {notes}{' '}
        <Link
          to={`/methods#${id}`}
          className={cx('font-semibold underline underline-offset-4', dark ? 'text-accent-200' : 'text-accent-700')}
        >
          How this is computed<span className="sr-only">: {title}</span>
        </Link>
      </figcaption>
    </figure>
  );
}
