/**
 * Validation of user-built strategies (finite automata, methods.md §3) and the compact numeric
 * form the value and equilibrium solvers use.
 */
import { PROFILES, type Automaton } from './automata';

/** A cap that keeps the strategy checker's joint state space ≤ 144 states. */
export const MAX_STATES = 12;

export interface AutomatonIssue {
  /** where the problem is: 'states', 'states[2].action', 'states[0].next.cd' … */
  path: string;
  message: string;
}

/** Checks an automaton that may come straight from a form or JSON. Empty list = valid. */
export function validateAutomaton(a: unknown): AutomatonIssue[] {
  const issues: AutomatonIssue[] = [];
  const states = a !== null && typeof a === 'object' && 'states' in a ? a.states : undefined;
  if (!Array.isArray(states) || states.length === 0) {
    return [{ path: 'states', message: 'A strategy needs at least one state.' }];
  }
  const n = states.length;
  if (n > MAX_STATES) {
    issues.push({ path: 'states', message: `A strategy may have at most ${MAX_STATES} states (this one has ${n}).` });
  }

  const edges: number[][] = [];
  states.forEach((raw: unknown, i: number) => {
    const out: number[] = [];
    edges.push(out);
    const st = raw as { action?: unknown; next?: unknown } | null;
    if (st === null || typeof st !== 'object') {
      issues.push({ path: `states[${i}]`, message: `State ${i + 1} is missing.` });
      return;
    }
    if (st.action !== 'C' && st.action !== 'D') {
      issues.push({ path: `states[${i}].action`, message: `State ${i + 1} must play C or D (got ${JSON.stringify(st.action)}).` });
    }
    const next = st.next as Record<string, unknown> | null | undefined;
    for (const p of PROFILES) {
      const t = next && typeof next === 'object' ? next[p] : undefined;
      const label = `after ${p[0].toUpperCase()}${p[1].toUpperCase()} (own ${p[0].toUpperCase()}, partner ${p[1].toUpperCase()})`;
      if (t === undefined || t === null) {
        issues.push({ path: `states[${i}].next.${p}`, message: `State ${i + 1} has no transition ${label}.` });
      } else if (typeof t !== 'number' || !Number.isInteger(t) || t < 0 || t >= n) {
        issues.push({
          path: `states[${i}].next.${p}`,
          message: `State ${i + 1}'s transition ${label} must point to a state 1–${n} (got ${JSON.stringify(t)}).`,
        });
      } else {
        out.push(t);
      }
    }
  });

  // Reachability over every observed profile: a state no history can lead to is a mistake.
  const seen = new Array<boolean>(n).fill(false);
  seen[0] = true;
  const queue = [0];
  while (queue.length > 0) {
    const s = queue.pop()!;
    for (const t of edges[s]) {
      if (!seen[t]) {
        seen[t] = true;
        queue.push(t);
      }
    }
  }
  seen.forEach((ok, i) => {
    if (!ok) issues.push({ path: `states[${i}]`, message: `State ${i + 1} cannot be reached from the starting state 1.` });
  });
  return issues;
}

/**
 * Numeric form: act[i] is 0 for C, 1 for D; next[i*4 + code] is the next state after the
 * observed profile with code = own*2 + partner (C = 0, D = 1), i.e. cc, cd, dc, dd = 0, 1, 2, 3.
 */
export interface CompiledAutomaton {
  id: string;
  n: number;
  act: Uint8Array;
  next: Int32Array;
}

export function compileAutomaton(a: Automaton): CompiledAutomaton {
  const issues = validateAutomaton(a);
  if (issues.length > 0) {
    throw new Error(`Invalid strategy "${a.id}": ${issues.map((x) => x.message).join(' ')}`);
  }
  const n = a.states.length;
  const act = new Uint8Array(n);
  const next = new Int32Array(n * 4);
  a.states.forEach((s, i) => {
    act[i] = s.action === 'C' ? 0 : 1;
    PROFILES.forEach((p, code) => {
      next[i * 4 + code] = s.next[p];
    });
  });
  return { id: a.id, n, act, next };
}
