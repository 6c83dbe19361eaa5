/**
 * Pairings for a supergame: random re-matching between supergames that avoids earlier partners
 * while possible (product.md, "Play"; methods.md §2 [practice]).
 *
 * Two steps:
 * 1. A seeded round-robin schedule (circle method) over the present participants, plus a "bye"
 *    seat for an odd count. With an even head-count a round-robin gives n − 1 supergames of perfect
 *    strangers [common practice]; a myopic choice can paint itself into a corner before that (after
 *    three matchings of six people the unmet pairs may form two triangles). The first round of the
 *    schedule that repeats nobody (and gives the bye to someone with the fewest byes) is taken.
 * 2. Otherwise (the head-count changed, or everyone has met), the fewest repeat pairs: a maximum
 *    matching (Edmonds' blossom algorithm) in the graph of pairs that have never met; whoever is left
 *    unmatched must be paired with someone already met, and every maximum matching leaves the fewest
 *    such pairs. Exact for any n; ties are broken by a seeded shuffle.
 *
 * Odd head-count: one participant (among those who have had the computer partner or sat out the
 * fewest times) gets a disclosed computer partner, or sits out, as the design says.
 */
import { randomInt, rngFor, shuffleInPlace, type Seed } from './rng';

export type OddCountPolicy = { kind: 'computer'; strategy: string } | { kind: 'sit-out' };

export interface MatchingInput {
  supergame: number;
  /** participants present for this supergame, in a stable order (e.g. join order) */
  participants: readonly string[];
  /** every human pair of earlier supergames (a pair that met twice may appear twice) */
  pastPairs: readonly (readonly [string, string])[];
  /** times each participant already had the computer partner / sat out (missing = 0) */
  oddCounts?: Readonly<Record<string, number>>;
  policy: OddCountPolicy;
  /** the session seed */
  seed: Seed;
}

export interface OddOut {
  participantId: string;
  kind: 'computer' | 'sit-out';
  /** the computer partner's strategy (library id) */
  strategy: string | null;
}

export interface Matching {
  supergame: number;
  pairs: [string, string][];
  odd: OddOut | null;
  /** pairs in `pairs` that met in an earlier supergame */
  repeats: number;
  method: 'round-robin' | 'max-matching';
}

interface Prepared {
  ids: string[];
  n: number;
  /** times i and j met before, capped at 255 */
  met: Uint8Array;
  /** may i take the odd seat (fewest odd-count turns so far)? */
  eligible: boolean[];
}

function prepare(input: MatchingInput): Prepared {
  const ids = [...input.participants];
  const n = ids.length;
  const index = new Map<string, number>();
  ids.forEach((id, i) => {
    if (index.has(id)) throw new Error(`Participant "${id}" is listed twice`);
    index.set(id, i);
  });
  const met = new Uint8Array(n * n);
  for (const [a, b] of input.pastPairs) {
    const i = index.get(a);
    const j = index.get(b);
    if (i === undefined || j === undefined || i === j) continue;
    if (met[i * n + j] < 255) {
      met[i * n + j]++;
      met[j * n + i]++;
    }
  }
  const counts = ids.map((id) => input.oddCounts?.[id] ?? 0);
  const fewest = n > 0 ? Math.min(...counts) : 0;
  return { ids, n, met, eligible: counts.map((c) => c === fewest) };
}

function finish(p: Prepared, input: MatchingInput, pairIdx: [number, number][], oddIdx: number | null, method: Matching['method']): Matching {
  const pairs = pairIdx
    .map(([a, b]) => (a < b ? [a, b] : [b, a]) as [number, number])
    .sort((x, y) => x[0] - y[0]);
  return {
    supergame: input.supergame,
    pairs: pairs.map(([a, b]) => [p.ids[a], p.ids[b]]),
    odd:
      oddIdx === null
        ? null
        : {
            participantId: p.ids[oddIdx],
            kind: input.policy.kind,
            strategy: input.policy.kind === 'computer' ? input.policy.strategy : null,
          },
    repeats: pairs.filter(([a, b]) => p.met[a * p.n + b] > 0).length,
    method,
  };
}

/** Step 1: a round of the session's seeded round-robin schedule that repeats nobody, if any. */
function fromRoundRobin(p: Prepared, input: MatchingInput): Matching | null {
  const { n, met, eligible } = p;
  const bye = n % 2 === 1 ? n : -1;
  const m = n % 2 === 1 ? n + 1 : n;
  if (m < 2) return null;
  // One schedule per session seed and head-count, the same in every supergame, so that successive
  // supergames walk through the rounds of one 1-factorisation.
  const rng = rngFor(input.seed, 'schedule', 0);
  const seatOf = shuffleInPlace(rng, Array.from({ length: m }, (_, i) => i));
  const rounds = shuffleInPlace(rng, Array.from({ length: m - 1 }, (_, i) => i));
  const last = m - 1;
  for (const r of rounds) {
    // circle method: position `last` stays, the others rotate; checked pair by pair, as most rounds
    // of a schedule that does not fit the history fail at once
    let oddIdx: number | null = null;
    const humanPairs: [number, number][] = [];
    let ok = true;
    for (let i = 0; i < m / 2 && ok; i++) {
      const a = i === 0 ? seatOf[last] : seatOf[(r + i) % last];
      const b = i === 0 ? seatOf[r] : seatOf[(r - i + last) % last];
      if (a === bye || b === bye) {
        oddIdx = a === bye ? b : a;
        ok = eligible[oddIdx];
      } else if (met[a * n + b] > 0) {
        ok = false;
      } else {
        humanPairs.push([a, b]);
      }
    }
    if (ok) return finish(p, input, humanPairs, oddIdx, 'round-robin');
  }
  return null;
}

/**
 * Maximum-cardinality matching, Edmonds' blossom algorithm (Edmonds 1965, "Paths, trees, and
 * flowers"), in the array form of the classic O(V³) textbook implementation. `match` may hold a
 * starting matching; neighbours are scanned in `order`, which randomises the ties.
 */
function maximumMatching(V: number, adj: (a: number, b: number) => boolean, order: readonly number[], match: Int32Array): void {
  const p = new Int32Array(V);
  const base = new Int32Array(V);
  const used = new Uint8Array(V);
  const blossom = new Uint8Array(V);
  const queue = new Int32Array(V);
  const seen = new Int32Array(V);
  let stamp = 0;

  const lca = (a0: number, b0: number): number => {
    stamp++;
    let a = a0;
    for (;;) {
      a = base[a];
      seen[a] = stamp;
      if (match[a] === -1) break;
      a = p[match[a]];
    }
    let b = b0;
    for (;;) {
      b = base[b];
      if (seen[b] === stamp) return b;
      b = p[match[b]];
    }
  };
  const markPath = (v0: number, b: number, child0: number): void => {
    let v = v0;
    let child = child0;
    while (base[v] !== b) {
      blossom[base[v]] = 1;
      blossom[base[match[v]]] = 1;
      p[v] = child;
      child = match[v];
      v = p[match[v]];
    }
  };
  const findPath = (root: number): number => {
    used.fill(0);
    p.fill(-1);
    for (let i = 0; i < V; i++) base[i] = i;
    used[root] = 1;
    let head = 0;
    let tail = 0;
    queue[tail++] = root;
    while (head < tail) {
      const v = queue[head++];
      for (const to of order) {
        if (to === v || !adj(v, to)) continue;
        if (base[v] === base[to] || match[v] === to) continue;
        if (to === root || (match[to] !== -1 && p[match[to]] !== -1)) {
          const cur = lca(v, to);
          blossom.fill(0);
          markPath(v, cur, to);
          markPath(to, cur, v);
          for (let i = 0; i < V; i++) {
            if (blossom[base[i]]) {
              base[i] = cur;
              if (!used[i]) {
                used[i] = 1;
                queue[tail++] = i;
              }
            }
          }
        } else if (p[to] === -1) {
          p[to] = v;
          if (match[to] === -1) return to;
          used[match[to]] = 1;
          queue[tail++] = match[to];
        }
      }
    }
    return -1;
  };

  /**
   * The shortest augmenting path after a greedy start is usually root – u = w – x (x free). Trying
   * it first spares the full search, which in a dense graph contracts many blossoms.
   */
  const shortPath = (root: number): boolean => {
    const free: number[] = [];
    for (let x = 0; x < V; x++) if (match[x] === -1 && x !== root) free.push(x);
    if (free.length === 0) return false;
    for (const u of order) {
      const w = match[u];
      if (w === -1 || u === root || !adj(root, u)) continue;
      for (const x of free) {
        if (x !== w && adj(w, x)) {
          match[root] = u;
          match[u] = root;
          match[w] = x;
          match[x] = w;
          return true;
        }
      }
    }
    return false;
  };

  // A vertex with no augmenting path now never gets one later (Edmonds), so one pass suffices.
  for (const root of order) {
    if (match[root] !== -1) continue;
    if (shortPath(root)) continue;
    let v = findPath(root);
    while (v !== -1) {
      const pv = p[v];
      const ppv = match[pv];
      match[v] = pv;
      match[pv] = v;
      v = ppv;
    }
  }
}

/** Step 2 on its own: the fewest repeat pairs, exact, random among the best. */
export function matchMinimisingRepeats(input: MatchingInput, prepared?: Prepared): Matching {
  const p = prepared ?? prepare(input);
  const { n, met, eligible } = p;
  const odd = n % 2 === 1;
  // the odd seat is a dummy vertex joined only to those with the fewest odd-count turns
  const V = odd ? n + 1 : n;
  const dummy = odd ? n : -1;
  const adj = (a: number, b: number): boolean => {
    if (a === dummy) return eligible[b];
    if (b === dummy) return eligible[a];
    return met[a * n + b] === 0;
  };
  const rng = rngFor(input.seed, 'matching', input.supergame);
  const order = shuffleInPlace(rng, Array.from({ length: V }, (_, i) => i));
  const match = new Int32Array(V).fill(-1);

  // random greedy start: on the dense graphs of a class it leaves very few vertices to augment
  for (const v of order) {
    if (match[v] !== -1) continue;
    const offset = V > 0 ? randomInt(rng, 0, V - 1) : 0;
    for (let t = 0; t < V; t++) {
      const u = order[(offset + t) % V];
      if (u !== v && match[u] === -1 && adj(v, u)) {
        match[v] = u;
        match[u] = v;
        break;
      }
    }
  }
  maximumMatching(V, adj, order, match);

  let oddIdx: number | null = null;
  if (odd) {
    if (match[dummy] === -1) {
      // Swapping an eligible participant's partner for the dummy keeps the matching maximum.
      const candidates = order.filter((i) => i !== dummy && eligible[i]);
      const c = candidates[0];
      if (match[c] !== -1) match[match[c]] = -1;
      match[c] = dummy;
      match[dummy] = c;
    }
    oddIdx = match[dummy];
  }

  const pairs: [number, number][] = [];
  const free: number[] = [];
  for (const v of order) {
    if (v === dummy || v === oddIdx) continue;
    if (match[v] === -1) free.push(v);
    else if (v < match[v]) pairs.push([v, match[v]]);
  }
  // Any two left over have met (else the matching was not maximum); pair those who met least.
  while (free.length > 1) {
    const a = free.shift() as number;
    let best = 0;
    for (let k = 1; k < free.length; k++) if (met[a * n + free[k]] < met[a * n + free[best]]) best = k;
    pairs.push([a, free.splice(best, 1)[0]]);
  }
  return finish(p, input, pairs, oddIdx, 'max-matching');
}

/** Pairings for one supergame: the round-robin round when it repeats nobody, else the fewest repeats. */
export function matchSupergame(input: MatchingInput): Matching {
  if (!Number.isInteger(input.supergame) || input.supergame < 1) throw new RangeError(`Bad supergame ${input.supergame}`);
  const p = prepare(input);
  if (p.n === 0) return finish(p, input, [], null, 'max-matching');
  return fromRoundRobin(p, input) ?? matchMinimisingRepeats(input, p);
}
