/**
 * Timing of the partner matching at the start of a supergame (moved here from the unit tests, which
 * keep the correctness part: tests/unit/matching.test.ts).
 * Run: npm run bench:matching   (exit code 1 when a target is missed)
 * Each figure is the median of timed runs after warm-up runs (JIT, GC). The floor, measured in the
 * same run, is the least any matching must do: read the history once into a pair-count map. The
 * ratio to it says how the matching scales on this machine, whatever the machine's speed.
 */
import { type MatchingInput, type OddCountPolicy, matchMinimisingRepeats, matchSupergame } from '#app/lib/matching';
import { ids, randomHistory as history } from '#tests/helpers/pairs';

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

let kept = 0;
/** Median ms of `runs` timed calls after `warm` untimed ones; input k is fresh for every call. */
function time(warm: number, runs: number, fn: (k: number) => number): number {
  for (let k = 0; k < warm; k++) kept += fn(k);
  const ms: number[] = [];
  for (let k = warm; k < warm + runs; k++) {
    const t = performance.now();
    kept += fn(k); // keep the result so the work cannot be optimised away
    ms.push(performance.now() - t);
  }
  return median(ms);
}

/** The floor: every matching reads the pair history into counts at least once. */
function readHistory(past: readonly [string, string][]): number {
  const counts = new Map<string, number>();
  for (const [a, b] of past) {
    const key = a < b ? `${a}|${b}` : `${b}|${a}`;
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  return counts.size;
}

const computer: OddCountPolicy = { kind: 'computer', strategy: 'TFT' };
const sitOut: OddCountPolicy = { kind: 'sit-out' };
let allOk = true;

function report(label: string, ms: number, floorMs: number, targetMs: number) {
  const ok = ms < targetMs;
  allOk &&= ok;
  console.log(
    `${label.padEnd(62)} median ${ms.toFixed(2).padStart(7)} ms  floor ${floorMs.toFixed(2).padStart(6)} ms  ` +
      `ratio ${(ms / floorMs).toFixed(1).padStart(6)}  (target < ${targetMs} ms) ${ok ? 'ok' : 'MISSED'}`,
  );
}

// A seminar: 40 people after 11 supergames, matched exactly (maximum-weight matching).
{
  const past = history(40, 11, 1);
  const input = (k: number): MatchingInput => ({ supergame: 12, participants: ids(40), pastPairs: past, policy: computer, seed: 1 + k });
  const floor = time(20, 41, () => readHistory(past));
  report(
    'n = 40, 11 supergames of history: matchMinimisingRepeats',
    time(3, 21, (k) => matchMinimisingRepeats(input(k)).repeats),
    floor,
    10,
  );
}

// A lecture hall: 1000 (and 999, one sits out) after 30 supergames.
for (const n of [1000, 999]) {
  const past = history(n, 30, n);
  const input = (k: number): MatchingInput => ({ supergame: 31 + k, participants: ids(n), pastPairs: past, policy: sitOut, seed: n + k });
  const floor = time(3, 11, () => readHistory(past));
  report(
    `n = ${n}, 30 supergames of history: matchSupergame`,
    time(3, 5, (k) => matchSupergame(input(k)).repeats),
    floor,
    50,
  );
  report(
    `n = ${n}, 30 supergames of history: matchMinimisingRepeats`,
    time(3, 5, (k) => matchMinimisingRepeats(input(k)).repeats),
    floor,
    50,
  );
}

if (Number.isNaN(kept) || !allOk) process.exitCode = 1;
