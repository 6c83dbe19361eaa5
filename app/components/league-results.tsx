// A league's results for staff: the ranking (TanStack Table), the pairwise per-round values as a
// heat-map table (numbers always shown; colour is extra) and the background fitness in words (the
// evolution chart is league-charts.tsx, shared with the phones and the projector). Sources in the captions:
// Axelrod (1984) for the tournament, Taylor & Jonker (1978) for the replicator dynamics,
// Dal Bó & Fréchette (2011) for strategy-frequency estimation.
import { DataTable, staffColumnHelper } from './data-table';
import { cx } from './ui';

export interface RankedRow {
  index: number;
  rank: number;
  name: string;
  house: boolean;
  score: number;
  simScore: number | null;
  simSe: number | null;
  finalShare: number;
}

const fmt = (x: number, d = 3) => x.toFixed(d);
const pct = (x: number, d = 1) => `${(100 * x).toFixed(d)} %`;

export function RankingTable({ rows, simulated }: { rows: RankedRow[]; simulated: boolean }) {
  const col = staffColumnHelper<RankedRow>();
  const columns = col.columns([
    col.accessor('rank', { header: 'Rank', meta: { align: 'right' } }),
    col.accessor('name', {
      header: 'Entry',
      cell: (i) => (
        <span className="font-semibold">
          {i.getValue()}
          {i.row.original.house ? (
            <span className="ml-2 inline-block rounded border border-slate-300 bg-slate-50 px-1.5 py-0.5 text-xs font-semibold whitespace-nowrap">
              <span aria-hidden="true">⌂ </span>House
            </span>
          ) : null}
        </span>
      ),
    }),
    col.accessor('score', { header: 'Mean per round (exact)', cell: (i) => fmt(i.getValue()), meta: { align: 'right' } }),
    ...(simulated
      ? [
          col.accessor((r) => r.simScore ?? 0, {
            id: 'sim',
            header: 'Simulated mean ± SE',
            cell: (i) => `${fmt(i.row.original.simScore ?? 0)} ± ${fmt(i.row.original.simSe ?? 0)}`,
            meta: { align: 'right' },
          }),
        ]
      : []),
    col.accessor('finalShare', { header: 'Share after evolution', cell: (i) => pct(i.getValue()), meta: { align: 'right' } }),
  ]);
  return (
    <DataTable
      columns={columns}
      data={rows}
      caption="Ranking of the entries"
      filterLabel="Filter entries"
      initialSorting={[{ id: 'rank', desc: false }]}
    />
  );
}

/** WCAG relative luminance of an sRGB colour given as 0–1 channels. */
function luminance([r, g, b]: number[]) {
  const lin = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
}

/** HSL (h in degrees, s and l in 0–1) → sRGB channels in 0–1. */
function hsl(h: number, s: number, l: number) {
  const a = s * Math.min(l, 1 - l);
  const f = (n: number) => {
    const k = (n + h / 30) % 12;
    return l - a * Math.max(-1, Math.min(k - 3, 9 - k, 1));
  };
  return [f(0), f(8), f(4)];
}

/**
 * Background of a heat-map cell: darker teal for higher values; the number is always printed, in
 * black or white, whichever contrasts more with the cell (always at least 4.5 : 1, WCAG AA).
 */
function heat(v: number, lo: number, hi: number) {
  const t = hi > lo ? Math.min(1, Math.max(0, (v - lo) / (hi - lo))) : 0.5;
  const lightness = 0.96 - 0.62 * t;
  const y = luminance(hsl(183, 0.45, lightness));
  const onBlack = (y + 0.05) / 0.05;
  const onWhite = 1.05 / (y + 0.05);
  return { background: `hsl(183 45% ${(lightness * 100).toFixed(1)}%)`, color: onBlack >= onWhite ? '#000' : '#fff' };
}

export function HeatMapTable({
  names,
  order,
  perRound,
  lo,
  hi,
}: {
  names: string[];
  /** entry indices in the order shown (the ranking) */
  order: number[];
  perRound: number[][];
  lo: number;
  hi: number;
}) {
  return (
    <div className="max-h-[36rem] overflow-auto rounded-lg border border-slate-200 bg-white">
      <table className="border-collapse text-sm" data-testid="league-matrix">
        <caption className="sr-only">
          Per-round payoff of the row entry against the column entry; each entry also meets a copy of itself (the diagonal).
        </caption>
        <thead>
          <tr>
            <th scope="col" className="sticky top-0 left-0 z-20 bg-white px-2 py-1 text-left">
              Row against column →
            </th>
            {order.map((j) => (
              <th key={j} scope="col" className="sticky top-0 z-10 max-w-28 bg-white px-2 py-1 text-left align-bottom font-semibold">
                <span className="line-clamp-2">{names[j]}</span>
              </th>
            ))}
            <th scope="col" className="sticky top-0 z-10 bg-white px-2 py-1 text-right">
              Mean
            </th>
          </tr>
        </thead>
        <tbody>
          {order.map((i) => (
            <tr key={i}>
              <th scope="row" className="sticky left-0 z-10 max-w-48 bg-white px-2 py-1 text-left font-semibold whitespace-nowrap">
                {names[i]}
              </th>
              {order.map((j) => (
                <td
                  key={j}
                  className={cx('num px-2 py-1 text-right', i === j && 'outline outline-1 -outline-offset-2 outline-slate-500')}
                  style={heat(perRound[i][j], lo, hi)}
                >
                  {fmt(perRound[i][j], 2)}
                </td>
              ))}
              <td className="num px-2 py-1 text-right font-semibold">{fmt(perRound[i].reduce((s, v) => s + v, 0) / perRound.length, 3)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** The background fitness in words (methods: x' = x(c + f)/(c + f̄)). */
export function backgroundWords(c: number) {
  return c === 0
    ? 'Each generation an entry’s share grows in proportion to its mean payoff against the current population (no background fitness is added: every payoff is positive).'
    : `Each generation an entry’s share grows in proportion to its mean payoff against the current population plus a background fitness of ${fmt(c, 2)} points, added so that every fitness is positive.`;
}
