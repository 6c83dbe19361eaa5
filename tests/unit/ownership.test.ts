import { describe, expect, it } from 'vitest';
import { ownerOf, weight } from '#realtime/ownership';

// Rendezvous (highest-random-weight) hashing. Source: Thaler & Ravishankar (1998), "Using
// name-based mappings to increase hit rates", IEEE/ACM Transactions on Networking 6(1): each
// object goes to the server with the highest hash of (server, object); removing a server moves
// only the objects it held, and each server holds about 1/n of the objects.
const SESSIONS = Array.from({ length: 4000 }, (_, i) => i + 1);
const members = (n: number) => Array.from({ length: n }, (_, i) => `m${i}-${(i * 7919).toString(36)}`);

describe('ownerOf', () => {
  it('is the same on every process: the order of the member list does not matter', () => {
    const m = members(5);
    const reversed = [...m].reverse();
    for (const s of SESSIONS.slice(0, 500)) expect(ownerOf(s, m)).toBe(ownerOf(s, reversed));
  });

  it('has no owner without members and the only member owns everything', () => {
    expect(ownerOf(1, [])).toBeNull();
    expect(SESSIONS.slice(0, 100).every((s) => ownerOf(s, ['solo']) === 'solo')).toBe(true);
  });

  it('balances: with 2, 3 and 4 members each holds about 1/n of the sessions', () => {
    for (const n of [2, 3, 4]) {
      const m = members(n);
      const held = new Map(m.map((x) => [x, 0]));
      for (const s of SESSIONS) {
        const o = ownerOf(s, m)!;
        held.set(o, held.get(o)! + 1);
      }
      // Binomial(4000, 1/n): the standard deviation is at most √(4000·¼) ≈ 32; ±5 sd ≈ ±160.
      for (const count of held.values()) expect(Math.abs(count - SESSIONS.length / n)).toBeLessThan(160);
    }
  });

  it('moves only the sessions of a member that leaves, spread over the others', () => {
    const before = members(4);
    const gone = before[1];
    const after = before.filter((m) => m !== gone);
    const receivers = new Map<string, number>();
    let moved = 0;
    for (const s of SESSIONS) {
      const was = ownerOf(s, before)!;
      const is = ownerOf(s, after)!;
      if (was !== gone) expect(is).toBe(was);
      else {
        moved++;
        receivers.set(is, (receivers.get(is) ?? 0) + 1);
      }
    }
    expect(moved).toBeGreaterThan(SESSIONS.length / 4 - 160);
    expect(moved).toBeLessThan(SESSIONS.length / 4 + 160);
    // The leaver's sessions do not all land on one member: each of the 3 gets about a third.
    for (const count of receivers.values()) expect(Math.abs(count - moved / 3)).toBeLessThan(110);
  });

  it('a member that joins takes about 1/n, and only from the others (no session moves between old members)', () => {
    const before = members(3);
    const after = [...before, 'newcomer'];
    let taken = 0;
    for (const s of SESSIONS) {
      const was = ownerOf(s, before);
      const is = ownerOf(s, after);
      if (is === 'newcomer') taken++;
      else expect(is).toBe(was);
    }
    expect(Math.abs(taken - SESSIONS.length / 4)).toBeLessThan(160);
  });

  it('weights are 48-bit integers that differ by member and by session', () => {
    const w = weight('a', 1);
    expect(Number.isInteger(w) && w >= 0 && w < 2 ** 48).toBe(true);
    expect(weight('b', 1)).not.toBe(w);
    expect(weight('a', 2)).not.toBe(w);
  });
});
