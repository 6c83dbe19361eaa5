/**
 * Simulated choice panels for recovery tests and benchmarks: subjects with known strategies play
 * randomly re-matched supergames whose lengths are geometric with δ (one draw per supergame,
 * methods.md §2); each choice follows the strategy with probability β, else it flips (the tremble
 * model of methods.md §5). Strategies follow the observed history (methods.md §3). Pure.
 */
import { profileOf } from './automata';
import type { Action, Automaton } from './automata';
import type { ChoiceRow } from './panel';
import { mulberry32 } from './prng';

export interface SimulationSpec {
  strategies: readonly Automaton[];
  /** population shares, one per strategy; subjects are assigned by quota (rounded), then shuffled */
  shares: readonly number[];
  beta: number;
  subjects: number;
  supergames: number;
  delta: number;
  seed: number;
  session?: string;
  treatment?: string;
}

export interface SimulatedPanel {
  rows: ChoiceRow[];
  /** the strategy id each subject was given, by subject code */
  truth: Map<string, string>;
}

export function simulatePanel(spec: SimulationSpec): SimulatedPanel {
  const { strategies, shares, beta, subjects: N, supergames, delta } = spec;
  if (N % 2 !== 0) throw new Error('simulatePanel pairs subjects: use an even number');
  const rng = mulberry32(spec.seed);
  const session = spec.session ?? 'SIM';
  const treatment = spec.treatment ?? 'SIM';

  // Quotas by largest remainder, so the realised shares equal the stated ones up to 1/N.
  const raw = shares.map((s) => s * N);
  const counts = raw.map(Math.floor);
  const order = raw.map((r, k) => [r - Math.floor(r), k] as const).sort((a, b) => b[0] - a[0]);
  for (let j = 0; counts.reduce((s, c) => s + c, 0) < N; j++) counts[order[j][1]]++;
  const assigned: number[] = counts.flatMap((c, k) => Array<number>(c).fill(k));
  shuffle(assigned, rng);

  const code = (i: number) => `${session}-${String(i + 1).padStart(4, '0')}`;
  const truth = new Map(assigned.map((k, i) => [code(i), strategies[k].id]));
  const rows: ChoiceRow[] = [];
  const ids = Array.from({ length: N }, (_, i) => i);
  for (let g = 1; g <= supergames; g++) {
    let length = 1;
    while (rng() < delta) length++;
    shuffle(ids, rng);
    for (let p = 0; p < N; p += 2) {
      const i = ids[p];
      const j = ids[p + 1];
      const a = strategies[assigned[i]];
      const b = strategies[assigned[j]];
      let si = 0;
      let sj = 0;
      for (let t = 1; t <= length; t++) {
        const ai = tremble(a.states[si].action, beta, rng);
        const aj = tremble(b.states[sj].action, beta, rng);
        rows.push({ session, treatment, subject: code(i), partner: code(j), supergame: g, round: t, action: ai, partnerAction: aj });
        rows.push({ session, treatment, subject: code(j), partner: code(i), supergame: g, round: t, action: aj, partnerAction: ai });
        si = a.states[si].next[profileOf(ai, aj)];
        sj = b.states[sj].next[profileOf(aj, ai)];
      }
    }
  }
  return { rows, truth };
}

function tremble(intended: Action, beta: number, rng: () => number): Action {
  if (rng() < beta) return intended;
  return intended === 'C' ? 'D' : 'C';
}

function shuffle<T>(xs: T[], rng: () => number): void {
  for (let i = xs.length - 1; i > 0; i--) {
    const j = Math.floor(rng() * (i + 1));
    [xs[i], xs[j]] = [xs[j], xs[i]];
  }
}
