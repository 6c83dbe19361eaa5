/**
 * Pairings for a supergame: random re-matching between supergames that avoids earlier partners
 * while possible (product.md, "Play"; methods.md §2 [practice]).
 *
 * Two steps:
 * 1. A seeded round-robin schedule (circle method) over the present participants, plus a "bye"
 *    seat for an odd count. With an even head-count a round-robin gives n − 1 supergames of perfect
 *    strangers [common practice]; a myopic choice can paint itself into a corner before that (after
 *    three matchings of six people the unmet pairs may form two triangles). The first round of the
 *    schedule whose pairs all met as often as the least-met pair (never, at first), none of them
 *    the previous partners, and which gives the bye to someone with the fewest byes, is taken; a
 *    fixed group so cycles through the schedule and meeting counts stay even.
 * 2. Otherwise (the head-count changed), a maximum matching (Edmonds' blossom algorithm) in the
 *    graph of pairs that have never met; when it pairs everyone, nobody repeats.
 * 3. When some must meet again (everyone has met, or nearly), the pairing that, in this order,
 *    (a) pairs nobody with the partner of the previous supergame when another pairing exists,
 *    (b) repeats the fewest pairs, (c) keeps meeting counts as even as possible (the smallest sum
 *    of squared meeting counts). Exact for up to 150 people (Edmonds' weighted matching, through
 *    the edmonds-blossom-fixed package); above that, (a) and (b) exactly and (c) by a threshold
 *    search. Ties are broken by a seeded shuffle. (docs/decisions/025.)
 *
 * Odd head-count: one participant (among those who have had the computer partner or sat out the
 * fewest times) gets a disclosed computer partner, or sits out, as the design says.
 */
import maxWeightMatching from 'edmonds-blossom-fixed';
import { type RandomStream, randomInt, rngFor, shuffleInPlace, type Seed } from './rng';

export type OddCountPolicy = { kind: 'computer'; strategy: string } | { kind: 'sit-out' };

export interface MatchingInput {
  supergame: number;
  /** participants present for this supergame, in a stable order (e.g. join order) */
  participants: readonly string[];
  /** every human pair of earlier supergames (a pair that met twice may appear twice) */
  pastPairs: readonly (readonly [string, string])[];
  /** the human pairs of the supergame just played (nobody meets that partner again when avoidable) */
  lastPairs?: readonly (readonly [string, string])[];
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
  /** pairs in `pairs` that were also partners in the previous supergame */
  previousAgain: number;
  method: 'round-robin' | 'max-matching' | 'balanced';
}

interface Prepared {
  ids: string[];
  n: number;
  /** times i and j met before, capped at 255 */
  met: Uint8Array;
  /** 1 where i and j were partners in the previous supergame */
  last: Uint8Array;
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
  const last = new Uint8Array(n * n);
  for (const [a, b] of input.lastPairs ?? []) {
    const i = index.get(a);
    const j = index.get(b);
    if (i === undefined || j === undefined || i === j) continue;
    last[i * n + j] = 1;
    last[j * n + i] = 1;
  }
  const counts = ids.map((id) => input.oddCounts?.[id] ?? 0);
  const fewest = n > 0 ? Math.min(...counts) : 0;
  return { ids, n, met, last, eligible: counts.map((c) => c === fewest) };
}

function finish(
  p: Prepared,
  input: MatchingInput,
  pairIdx: [number, number][],
  oddIdx: number | null,
  method: Matching['method'],
): Matching {
  const pairs = pairIdx.map(([a, b]) => (a < b ? [a, b] : [b, a]) as [number, number]).sort((x, y) => x[0] - y[0]);
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
    previousAgain: pairs.filter(([a, b]) => p.last[a * p.n + b] > 0).length,
    method,
  };
}

/**
 * Step 1: a round of the session's seeded round-robin schedule whose pairs have all met exactly as
 * often as the least-met pair of the group (never, until everyone has met), and none of whom were
 * partners in the previous supergame. A group that stays the same thus walks through the schedule
 * again and again: every pair meets ⌊S/(n−1)⌋ or ⌈S/(n−1)⌉ times in S supergames.
 */
function fromRoundRobin(p: Prepared, input: MatchingInput): Matching | null {
  const { n, met, eligible } = p;
  const previous = p.last;
  let level = 255;
  for (let a = 0; a < n && level > 0; a++) for (let b = a + 1; b < n; b++) if (met[a * n + b] < level) level = met[a * n + b];
  const bye = n % 2 === 1 ? n : -1;
  const m = n % 2 === 1 ? n + 1 : n;
  if (m < 2) return null;
  // One schedule per session seed and head-count, the same in every supergame, so that successive
  // supergames walk through the rounds of one 1-factorisation.
  const rng = rngFor(input.seed, 'schedule', 0);
  const seatOf = shuffleInPlace(
    rng,
    Array.from({ length: m }, (_, i) => i),
  );
  const rounds = shuffleInPlace(
    rng,
    Array.from({ length: m - 1 }, (_, i) => i),
  );
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
      } else if (met[a * n + b] !== level || previous[a * n + b]) {
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

/** Steps 2 and 3 (everything but the round-robin schedule): see the head of this file. */
export function matchMinimisingRepeats(input: MatchingInput, prepared?: Prepared): Matching {
  const p = prepared ?? prepare(input);
  const { n, met } = p;
  const odd = n % 2 === 1;
  // the odd seat is a dummy vertex joined only to those with the fewest odd-count turns
  const V = odd ? n + 1 : n;
  const dummy = odd ? n : -1;
  const rng = rngFor(input.seed, 'matching', input.supergame);
  const order = shuffleInPlace(
    rng,
    Array.from({ length: V }, (_, i) => i),
  );

  const neverMet = allowing(p, dummy, (a, b) => met[a * n + b] === 0);
  const match = greedyStart(V, neverMet, order, rng);
  maximumMatching(V, neverMet, order, match);
  if (isPerfect(match)) return fromMates(p, input, match, dummy, 'max-matching');
  const balanced = V <= EXACT_UP_TO ? balancedExact(p, dummy, order) : balancedByThreshold(p, dummy, order, match);
  return fromMates(p, input, balanced, dummy, 'balanced');
}

/** Above this many seats the weighted matching (O(V³)) would slow a supergame boundary. */
const EXACT_UP_TO = 150;

type Adjacency = (a: number, b: number) => boolean;

/** Human pairs allowed by `ok`; the dummy odd seat is joined to the eligible. */
function allowing(p: Prepared, dummy: number, ok: Adjacency): Adjacency {
  return (a, b) => (a === dummy ? p.eligible[b] : b === dummy ? p.eligible[a] : ok(a, b));
}

const isPerfect = (match: Int32Array) => match.every((m) => m !== -1);

/** A random greedy matching: on the dense graphs of a class it leaves very few vertices to augment. */
function greedyStart(V: number, adj: Adjacency, order: readonly number[], rng: RandomStream, match = new Int32Array(V).fill(-1)) {
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
  return match;
}

/**
 * Step 3, exact: the maximum-weight perfect matching whose weight is, lexicographically, (a) no
 * partner of the previous supergame, (b) fewest repeats, (c) smallest Σ (met + 1)² − met² = 2·met + 1
 * over the chosen pairs, i.e. the smallest sum of squared meeting counts afterwards. Each level's
 * penalty exceeds the largest possible total of the levels below it.
 */
function balancedExact(p: Prepared, dummy: number, order: readonly number[]): Int32Array {
  const { n, met, last, eligible } = p;
  const V = dummy === -1 ? n : n + 1;
  let maxMet = 0;
  for (let i = 0; i < n * n; i++) if (met[i] > maxMet) maxMet = met[i];
  const half = Math.ceil(n / 2);
  const even = half * (2 * maxMet + 1) + 1;
  const repeat = half * even + even;
  const previous = half * repeat + repeat;
  const top = previous + repeat + even;
  // vertices renumbered in the seeded order, so ties fall randomly but reproducibly
  const label = new Int32Array(V);
  order.forEach((v, k) => (label[v] = k));
  const edges: [number, number, number][] = [];
  for (let a = 0; a < n; a++) {
    for (let b = a + 1; b < n; b++) {
      const m = met[a * n + b];
      const cost = (last[a * n + b] ? previous : 0) + (m > 0 ? repeat : 0) + 2 * m + 1;
      edges.push([label[a], label[b], top - cost]);
    }
    if (dummy !== -1 && eligible[a]) edges.push([label[a], label[dummy], top]);
  }
  const mate = maxWeightMatching(edges, true);
  const match = new Int32Array(V).fill(-1);
  for (let v = 0; v < V; v++) {
    const m = mate[label[v]];
    if (m !== undefined && m !== -1) match[v] = order[m];
  }
  return match;
}

/**
 * Step 3 for large classes: (a) and (b) exactly, (c) approximately. Starting from the maximum
 * never-met matching, allow pairs met at most k times (never the previous partner) for k = 1, 2, …
 * until everyone is paired; only if that fails are previous partners allowed.
 */
function balancedByThreshold(p: Prepared, dummy: number, order: readonly number[], neverMet: Int32Array): Int32Array {
  const { n, met, last } = p;
  const V = dummy === -1 ? n : n + 1;
  let maxMet = 0;
  for (let i = 0; i < n * n; i++) if (met[i] > maxMet) maxMet = met[i];
  for (const avoidLast of [true, false]) {
    for (let k = 1; k <= maxMet; k++) {
      const match = Int32Array.from(neverMet);
      maximumMatching(
        V,
        allowing(p, dummy, (a, b) => met[a * n + b] <= k && !(avoidLast && last[a * n + b])),
        order,
        match,
      );
      if (isPerfect(match)) return match;
    }
  }
  // Unreachable for n ≥ 1: with every pair allowed the graph is complete.
  const match = Int32Array.from(neverMet);
  maximumMatching(
    V,
    allowing(p, dummy, () => true),
    order,
    match,
  );
  return match;
}

function fromMates(p: Prepared, input: MatchingInput, match: Int32Array, dummy: number, method: Matching['method']): Matching {
  let oddIdx: number | null = null;
  if (dummy !== -1) {
    if (match[dummy] === -1) {
      // Swapping an eligible participant's partner for the dummy keeps the matching maximum.
      const c = p.eligible.findIndex((e) => e);
      if (match[c] !== -1) match[match[c]] = -1;
      match[c] = dummy;
      match[dummy] = c;
    }
    oddIdx = match[dummy];
  }
  const pairs: [number, number][] = [];
  const free: number[] = [];
  for (let v = 0; v < p.n; v++) {
    if (v === oddIdx) continue;
    if (match[v] === -1 || match[v] === dummy) free.push(v);
    else if (v < match[v]) pairs.push([v, match[v]]);
  }
  // Only after a failed search (never for a complete graph): pair the rest in order.
  for (let k = 0; k + 1 < free.length; k += 2) pairs.push([free[k], free[k + 1]]);
  return finish(p, input, pairs, oddIdx, method);
}

/** Pairings for one supergame: the round-robin round when it repeats nobody, else the fewest repeats. */
export function matchSupergame(input: MatchingInput): Matching {
  if (!Number.isInteger(input.supergame) || input.supergame < 1) throw new RangeError(`Bad supergame ${input.supergame}`);
  const p = prepare(input);
  if (p.n === 0) return finish(p, input, [], null, 'max-matching');
  return fromRoundRobin(p, input) ?? matchMinimisingRepeats(input, p);
}
