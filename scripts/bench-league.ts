/**
 * A strategy league of 200 entries (200·201/2 = 20,100 pairs, each against itself included):
 * exact round-robin, simulated round-robin and 1,000 generations of replicator dynamics.
 * Run: npm run bench:league   (exit code 1 when the target, < 5 s for the exact league, is missed)
 *
 * Entries: the library strategies as house entries plus seeded random automata of 1–6 states (what
 * students build); a second line gives every entry the league's cap of states, the worst case. The
 * floor, measured in the same run, is dense solves of the same sizes with ml-matrix (the first 2,000
 * pairs, scaled to all), so the ratio says what our solver costs against a library's on this
 * (shared, noisy) machine.
 */
import { Matrix, solve } from 'ml-matrix';
import { type Action, type Automaton, LIBRARY, PROFILES } from '#app/lib/automata';
import { validateAutomaton } from '#app/lib/automaton-check';
import { evolve, LEAGUE_MAX_STATES, roundRobin, simulatedRoundRobin } from '#app/lib/league';
import { mulberry32 } from '#app/lib/prng';

const GAME = { T: 5, R: 3, P: 1, S: 0 };
const TARGET_MS = 5000;

/** A random automaton whose states are all reachable: state k is entered from an earlier state. */
function randomAutomaton(random: () => number, states: number, id: string): Automaton {
  const pick = (n: number) => Math.floor(random() * n);
  const list = Array.from({ length: states }, () => ({
    action: (random() < 0.5 ? 'C' : 'D') as Action,
    next: Object.fromEntries(PROFILES.map((p) => [p, pick(states)])) as Automaton['states'][number]['next'],
  }));
  for (let k = 1; k < states; k++) list[pick(k)].next[PROFILES[pick(4)]] = k;
  const a = { id, name: id, states: list };
  // Re-linking can orphan a state that an earlier link reached; repair until valid.
  return validateAutomaton(a).length === 0 ? a : randomAutomaton(random, states, id);
}

function entries(n: number, maxStates: number, minStates: number, seed: number): Automaton[] {
  const random = mulberry32(seed);
  const house = maxStates === LEAGUE_MAX_STATES ? [] : [...LIBRARY];
  const out = [...house];
  while (out.length < n) {
    out.push(randomAutomaton(random, minStates + Math.floor(random() * (maxStates - minStates + 1)), `E${out.length}`));
  }
  return out;
}

function time<T>(fn: () => T): [T, number] {
  const t0 = performance.now();
  const r = fn();
  return [r, performance.now() - t0];
}

/** The floor: ml-matrix solves of one random diagonally dominant system per pair, sized like ours. */
function floor(sizes: number[], seed: number): number {
  const random = mulberry32(seed);
  const [, ms] = time(() => {
    let keep = 0;
    for (const n of sizes) {
      const m = Matrix.eye(n, n).mul(2);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) m.set(i, j, m.get(i, j) - random() / n);
      keep += solve(m, Matrix.columnVector(Array.from({ length: n }, () => random()))).get(0, 0);
    }
    return keep;
  });
  return ms;
}

const N = 200;
let ok = true;
const line = (label: string, ms: number, extra = '') => console.log(`${label.padEnd(62)} ${ms.toFixed(0).padStart(6)} ms ${extra}`);

for (const [label, maxStates, minStates] of [
  ['library + random entries of 1–4 states', 4, 1],
  [`worst case: every entry ${LEAGUE_MAX_STATES} states`, LEAGUE_MAX_STATES, LEAGUE_MAX_STATES],
] as const) {
  const list = entries(N, maxStates, minStates, 2026);
  const pairs = (N * (N + 1)) / 2;
  roundRobin(list.slice(0, 20), { game: GAME, delta: 0.9, epsilon: 0.05 }); // warm-up (JIT)
  const [exact0, ms0] = time(() => roundRobin(list, { game: GAME, delta: 0.99654, epsilon: 0 }));
  const [exact, ms] = time(() => roundRobin(list, { game: GAME, delta: 0.9, epsilon: 0.05 }));
  // joint sizes as the noisy solver sees them (an upper bound: reachable states may be fewer)
  const sizes: number[] = [];
  for (let i = 0; i < N; i++) for (let j = i; j < N; j++) sizes.push(list[i].states.length * list[j].states.length);
  const sample = 2000;
  const floorMs = (floor(sizes.slice(0, sample), 7) * sizes.length) / sample;
  const [, simMs] = time(() => simulatedRoundRobin(list, { game: GAME, delta: 0.9, epsilon: 0.05 }, { matches: 20, seed: 1 }));
  const [, evoMs] = time(() => evolve(exact, 1000));
  const target = ms < TARGET_MS ? `(target < ${TARGET_MS} ms) ok` : 'MISSED';
  if (ms >= TARGET_MS || ms0 >= TARGET_MS) ok = false;
  console.log(`\n${N} entries, ${label} — ${pairs.toLocaleString('en')} pairs`);
  line('exact round-robin, ε = 0 (deterministic paths), δ = 0.99654', ms0, ms0 < TARGET_MS ? 'ok' : 'MISSED');
  line('exact round-robin, ε = 0.05 (linear systems), δ = 0.9', ms, target);
  line('floor: one ml-matrix solve per pair at the full product size (est.)', floorMs, `ratio ${(ms / floorMs).toFixed(2)}`);
  line('simulated round-robin, 20 matches per pair, δ = 0.9, ε = 0.05', simMs);
  line('evolution, 1,000 generations', evoMs);
  if (!Number.isFinite(exact0[0][0]) || !Number.isFinite(exact[0][0])) ok = false;
}
if (!ok) process.exitCode = 1;
