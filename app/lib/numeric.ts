/**
 * Small numerical kernels used by the exact-value and equilibrium code: a dense linear solver,
 * discounted values on deterministic paths, and one-dimensional root and minimum finders.
 * Double precision throughout.
 */

/**
 * A pivot is treated as zero when |pivot| ≤ SINGULAR_REL × (largest |entry| of the matrix).
 * The systems (I − δM)V = ū of methods.md §4 are strictly diagonally dominant by a margin of
 * 1 − δ in every row, so their pivots stay of the order of 1 − δ and this only fires for δ
 * within ~1e-13 of 1.
 */
export const SINGULAR_REL = 1e-13;

/**
 * Solves A x = b by Gaussian elimination with partial pivoting. Copies its inputs.
 * Throws when the matrix is (numerically) singular.
 */
export function solveLinear(A: readonly (readonly number[])[], b: readonly number[]): number[] {
  const n = A.length;
  if (b.length !== n) throw new Error(`solveLinear: ${n} rows but ${b.length} right-hand sides`);
  const m = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    if (A[i].length !== n) throw new Error('solveLinear: the matrix must be square');
    for (let j = 0; j < n; j++) m[i * n + j] = A[i][j];
  }
  const [x] = solveInPlace(m, n, [Float64Array.from(b)]);
  return Array.from(x);
}

/**
 * Solves M X = B for several right-hand sides with one elimination, in place: `m` (n × n, row
 * major) is overwritten, each column of `rhs` becomes its solution and is returned.
 * Throws when the matrix is (numerically) singular.
 */
export function solveInPlace(m: Float64Array, n: number, rhs: Float64Array[]): Float64Array[] {
  let scale = 0;
  for (let i = 0; i < n * n; i++) if (Math.abs(m[i]) > scale) scale = Math.abs(m[i]);
  const tiny = SINGULAR_REL * scale;

  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(m[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(m[i * n + k]);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    if (!(best > tiny)) throw new Error('solveLinear: matrix is singular to working precision');
    if (p !== k) {
      for (let j = k; j < n; j++) {
        const t = m[k * n + j];
        m[k * n + j] = m[p * n + j];
        m[p * n + j] = t;
      }
      for (const x of rhs) {
        const t = x[k];
        x[k] = x[p];
        x[p] = t;
      }
    }
    const piv = m[k * n + k];
    for (let i = k + 1; i < n; i++) {
      const f = m[i * n + k] / piv;
      if (f === 0) continue;
      m[i * n + k] = 0;
      for (let j = k + 1; j < n; j++) m[i * n + j] -= f * m[k * n + j];
      for (const x of rhs) x[i] -= f * x[k];
    }
  }
  for (const x of rhs) {
    for (let i = n - 1; i >= 0; i--) {
      let s = x[i];
      for (let j = i + 1; j < n; j++) s -= m[i * n + j] * x[j];
      x[i] = s / m[i * n + i];
    }
  }
  return rhs;
}

/**
 * 1 − δ^k without cancellation: for δ near 1, 1 − δ^k computed directly loses the digits that
 * the geometric-series denominators (methods.md §2, §4) depend on.
 */
export function oneMinusPow(delta: number, k: number): number {
  return -Math.expm1(k * Math.log(delta));
}

/**
 * Discounted values V(w) = r(w) + δ V(succ(w)) of every node of a functional graph (each node
 * has exactly one successor), i.e. the solution of (I − δM)V = r for a 0/1 transition matrix M.
 * Each path is a prefix followed by a cycle of length L, whose value is
 * Σ_{m<L} δ^m r / (1 − δ^L) (geometric series); O(n) work, relative error a few ulp per node
 * on the path. Buffers are passed in so the equilibrium checker allocates nothing per δ.
 */
export function pathValues(
  succ: Int32Array,
  reward: Float64Array,
  delta: number,
  out: Float64Array,
  mark: Uint8Array,
  stack: Int32Array,
  n = succ.length,
): Float64Array {
  mark.fill(0, 0, n);
  for (let start = 0; start < n; start++) {
    if (mark[start] !== 0) continue;
    let top = 0;
    let v = start;
    while (mark[v] === 0) {
      mark[v] = 1;
      stack[top++] = v;
      v = succ[v];
    }
    if (mark[v] === 1) {
      // v lies on a new cycle: stack[c0 .. top) is the cycle in path order.
      let c0 = top - 1;
      while (stack[c0] !== v) c0--;
      const L = top - c0;
      let sum = 0;
      let pw = 1;
      for (let k = c0; k < top; k++) {
        sum += pw * reward[stack[k]];
        pw *= delta;
      }
      out[v] = sum / oneMinusPow(delta, L);
      mark[v] = 2;
      for (let k = top - 1; k > c0; k--) {
        const w = stack[k];
        out[w] = reward[w] + delta * out[succ[w]];
        mark[w] = 2;
      }
      top = c0;
    }
    for (let k = top - 1; k >= 0; k--) {
      const w = stack[k];
      out[w] = reward[w] + delta * out[succ[w]];
      mark[w] = 2;
    }
  }
  return out;
}

/**
 * Brent's method (zeroin) for a root of f in [a, b] with f(a), f(b) of opposite signs (or one
 * of them zero). Stops when the bracket is narrower than xtol (absolute, plus a few ulp of the
 * root) or a zero is hit; returns the best estimate.
 */
export function brentRoot(f: (x: number) => number, a: number, b: number, fa = f(a), fb = f(b), xtol = 1e-15, maxIter = 200): number {
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (fa > 0 === fb > 0) throw new Error('brentRoot: the bracket does not change sign');
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iter = 0; iter < maxIter; iter++) {
    if (fb > 0 === fc > 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + 0.5 * xtol;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) break;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      let p: number;
      let q: number;
      const s = fb / fa;
      if (a === c) {
        // secant step
        p = 2 * m * s;
        q = 1 - s;
      } else {
        // inverse quadratic interpolation
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
  }
  return b;
}

/** Golden-section search for a minimum of f on [a, b]; returns the best point seen. */
export function goldenMin(f: (x: number) => number, a: number, b: number, xtol = 1e-15, maxIter = 120): { x: number; fx: number } {
  const r = (Math.sqrt(5) - 1) / 2;
  let x1 = b - r * (b - a);
  let x2 = a + r * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let i = 0; i < maxIter && b - a > xtol; i++) {
    if (f1 <= f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - r * (b - a);
      f1 = f(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + r * (b - a);
      f2 = f(x2);
    }
  }
  return f1 <= f2 ? { x: x1, fx: f1 } : { x: x2, fx: f2 };
}
