/**
 * How long a restart takes to rebuild a large live session from its stored rows (issue 11: "well
 * under a second per 10,000 rows"). The rows come from a simulated 1,000-participant session
 * driven through the real engine (seeds/simulate.ts), so they are what a live session stores; the
 * replay is the engine's pure rebuild (realtime/engine/rebuild.ts), which builds no views. Reading
 * the rows from MariaDB is not included (one indexed SELECT per table).
 * Run: npm run bench:rebuild   (exit code 1 when the target is missed)
 */
import { designSchema } from '#app/lib/design';
import { rebuild } from '#realtime/engine/rebuild';
import type { StoredChoice, LogRow, ParticipantRow } from '#realtime/engine/types';
import { simulateSession } from '../seeds/simulate';

const N = Number(process.env.PARLEY_BENCH_REBUILD_N ?? 1000);
const design = designSchema.parse({ payoffs: { R: 48, S: 12, T: 50, P: 25 }, delta: 0.9, supergames: 4, roundSeconds: 30 });
const sim = simulateSession({
  sessionId: 'bench',
  design,
  seed: 118,
  participantIds: Array.from({ length: N }, (_, i) => `u${i}`),
  mixture: { TFT: 0.4, Grim: 0.2, ALLD: 0.2, WSLS: 0.1, ALLC: 0.1 },
  rngSeed: 7,
  startMs: Date.UTC(2026, 11, 2, 9),
});
const participants: ParticipantRow[] = [];
const choices: StoredChoice[] = [];
const logs: LogRow[] = [];
for (const e of sim.effects) {
  if (e.type === 'persist-participant') participants.push(e.row);
  else if (e.type === 'persist-choice') choices.push(e.row);
  else if (e.type === 'persist-log') logs.push(e.row);
}
const rows = participants.length + choices.length + logs.length;
const times: number[] = [];
for (let i = 0; i < 5; i++) {
  const t0 = performance.now();
  const state = rebuild(design, 118, participants, choices, logs, { sessionId: 'bench' });
  times.push(performance.now() - t0);
  if (state.seq !== sim.state.seq) throw new Error('the rebuild does not reach the stored sequence');
}
const best = Math.min(...times);
const median = [...times].sort((a, b) => a - b)[2];
const per10k = (median / rows) * 10_000;
const target = 1000;
console.log(
  `rebuild of ${N} participants, ${rows.toLocaleString('en-US')} stored rows: median ${median.toFixed(0)} ms (best ${best.toFixed(0)} ms) = ${per10k.toFixed(0)} ms per 10,000 rows; target < ${target} ms per 10,000 rows ${per10k < target ? '✓' : '✗'}`,
);
process.exit(per10k < target ? 0 : 1);
