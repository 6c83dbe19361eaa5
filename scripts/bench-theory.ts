/**
 * Timing of the design editor's live theory panel and of the strategy checker.
 * Run: npx tsx scripts/bench-theory.ts   (exit code 1 when a target is missed)
 * Each figure is the median over repeated runs after a warm-up.
 */
import { LIBRARY } from '#app/lib/automata';
import { checkStrategy } from '#app/lib/equilibrium';
import type { StageGame } from '#app/lib/stage-game';
import { classTimePlanner, expectedLength, lengthTable, medianLength } from '#app/lib/termination';
import { theoryAt } from '#app/lib/thresholds';

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

let kept: unknown;

function bench(label: string, targetMs: number, runs: number, fn: () => unknown): boolean {
  for (let i = 0; i < Math.min(20, runs); i++) fn(); // warm-up (JIT)
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    kept = fn(); // keep the result so the work cannot be optimised away
    times.push(performance.now() - t0);
  }
  const med = median(times);
  const ok = med < targetMs;
  console.log(
    `${label.padEnd(58)} median ${med.toFixed(3).padStart(8)} ms  max ${Math.max(...times)
      .toFixed(3)
      .padStart(8)} ms  ` + `(${runs} runs, target < ${targetMs} ms) ${ok ? 'ok' : 'MISSED'}`,
  );
  return ok;
}

// Dal Bó & Fréchette (2011) payoffs, R = 32 (methods.md §1), and a classroom case.
const games: [string, StageGame, number][] = [
  ['T=50 R=32 P=25 S=12, δ=0.75', { T: 50, R: 32, P: 25, S: 12 }, 0.75],
  ['T=4 R=3 P=2 S=1, δ=0.5', { T: 4, R: 3, P: 2, S: 1 }, 0.5],
];

let allOk = true;
for (const [name, game, delta] of games) {
  allOk =
    bench(`theory panel (theoryAt + length table + planner), ${name}`, 5, 2000, () => {
      const t = theoryAt(game, delta);
      const table = lengthTable(delta, 30);
      const plan = classTimePlanner({ supergames: 30, delta, secondsPerRound: 15, overheadSecondsPerSupergame: 10 });
      return t.sizeBAD + table.length + plan.minutes + expectedLength(delta) + medianLength(delta);
    }) && allOk;
  allOk =
    bench(`Nash + SPE intervals of all ${LIBRARY.length} library strategies, ${name.split(',')[0]}`, 50, 40, () =>
      LIBRARY.map((s) => checkStrategy(s, game)),
    ) && allOk;
}
if (kept === undefined || !allOk) process.exitCode = 1;
