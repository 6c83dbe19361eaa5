/**
 * Replicator dynamics over a strategy set with payoff matrix A (A[j][k] = V of j against k, e.g.
 * from valueMatrix). Source: Taylor & Jonker (1978) [mem]; methods.md §6.
 */
import { solveLinear } from './numeric';

/** f = A x */
export function fitness(A: readonly (readonly number[])[], x: readonly number[]): number[] {
  return A.map((row) => row.reduce((s, a, k) => s + a * x[k], 0));
}

/** f̄ = x · A x */
export function meanFitness(A: readonly (readonly number[])[], x: readonly number[]): number {
  return fitness(A, x).reduce((s, f, j) => s + f * x[j], 0);
}

/** Continuous replicator: ẋ_j = x_j (f_j − f̄). */
export function replicatorDerivative(A: readonly (readonly number[])[], x: readonly number[]): number[] {
  const f = fitness(A, x);
  const fbar = f.reduce((s, fj, j) => s + fj * x[j], 0);
  return x.map((xj, j) => xj * (f[j] - fbar));
}

/**
 * Default background fitness: 0 when every entry of A is positive (then every fitness is),
 * otherwise 1 − min A, which makes every c + f_j ≥ 1 > 0 so the discrete map stays in the simplex.
 */
export function defaultBackground(A: readonly (readonly number[])[]): number {
  const min = Math.min(...A.map((row) => Math.min(...row)));
  return min > 0 ? 0 : 1 - min;
}

/** Discrete replicator: x_j' = x_j (c + f_j) / (c + f̄). */
export function replicatorStep(A: readonly (readonly number[])[], x: readonly number[], c = defaultBackground(A)): number[] {
  const f = fitness(A, x);
  const fbar = f.reduce((s, fj, j) => s + fj * x[j], 0);
  if (!(c + fbar > 0)) throw new RangeError('background fitness too small: c + f̄ must be positive');
  return x.map((xj, j) => (xj * (c + f[j])) / (c + fbar));
}

export interface ReplicatorRun {
  x: number[];
  steps: number;
  /** true when a step moved no share by more than tol */
  converged: boolean;
}

/** Iterates the discrete map until no share moves by more than tol (a rest point) or maxSteps. */
export function iterateReplicator(
  A: readonly (readonly number[])[],
  x0: readonly number[],
  opts: { c?: number; tol?: number; maxSteps?: number } = {},
): ReplicatorRun {
  const c = opts.c ?? defaultBackground(A);
  const tol = opts.tol ?? 1e-12;
  const maxSteps = opts.maxSteps ?? 100_000;
  let x = [...x0];
  for (let step = 1; step <= maxSteps; step++) {
    const y = replicatorStep(A, x, c);
    const moved = Math.max(...y.map((v, j) => Math.abs(v - x[j])));
    x = y;
    if (moved <= tol) return { x, steps: step, converged: true };
  }
  return { x, steps: maxSteps, converged: false };
}

/**
 * The rest point with exactly the given support (default: all strategies): equal fitness on the
 * support, i.e. A_SS x_S = f̄ 1 and Σ x_S = 1. Null when that system is singular or the solution
 * leaves the simplex. For A = [[192, 87], [125, 100]] (Grim, ALLD) the Grim share is 0.1625,
 * the size of ALLD's basin of attraction (methods.md §6).
 */
export function interiorRestPoint(A: readonly (readonly number[])[], support?: readonly number[]): number[] | null {
  const S = support ?? A.map((_, j) => j);
  const m = S.length;
  const M: number[][] = [];
  const b: number[] = [];
  for (const j of S) {
    M.push([...S.map((k) => A[j][k]), -1]);
    b.push(0);
  }
  M.push([...S.map(() => 1), 0]);
  b.push(1);
  let sol: number[];
  try {
    sol = solveLinear(M, b);
  } catch {
    return null;
  }
  const x = new Array<number>(A.length).fill(0);
  for (let t = 0; t < m; t++) {
    if (!(sol[t] > 0)) return null;
    x[S[t]] = sol[t];
  }
  return x;
}
