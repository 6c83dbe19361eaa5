import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Action } from '#app/lib/automata';
import type { Design, DesignInput } from '#app/lib/design';
import { drawSequence, supergameDraws } from '#app/lib/draws';
import { createSession, newBatchScope, resumeEffects, step } from '#realtime/engine/engine';
import { RebuildError, rebuild } from '#realtime/engine/rebuild';
import type { StoredChoice, Effect, EngineEvent, EngineState } from '#realtime/engine/types';
import { bigScreenView, floorView, participantView } from '#realtime/engine/views';
import { TestHub, T0, joinAll, logical, makeDesign, play, rngOf } from './harness';

const SEC = 1000;

function payoff(d: Design, own: Action, partner: Action): number {
  // methods.md §0: u(C,C)=R, u(C,D)=S, u(D,C)=T, u(D,D)=P
  const { R, S, T, P } = d.payoffs;
  return own === 'C' ? (partner === 'C' ? R : S) : partner === 'C' ? T : P;
}

/** Paid points per participant recomputed from the stored rows alone. */
function pointsFromRows(hub: TestHub): Record<string, number> {
  const draws = drawSequence(hub.seed, hub.design.delta, hub.design.supergames, hub.design.termination).supergames;
  const byRound = new Map<string, StoredChoice[]>();
  for (const r of hub.choices) {
    const k = `${r.pairId}:${r.round}`;
    byRound.set(k, [...(byRound.get(k) ?? []), r]);
  }
  const out: Record<string, number> = {};
  for (const id of hub.state.joinOrder) out[id] = 0;
  for (const rows of byRound.values()) {
    if (rows.length !== 2) continue; // a round cut short by "end now"
    const [a, b] = rows.sort((x, y) => x.seat - y.seat);
    if (a.round > draws[a.supergame - 1].length) continue; // played, not paid (block termination)
    // a computer's rounds in a participant's seat (after a hand-over) are not theirs: decision 030
    if (a.participantId && a.source !== 'computer') out[a.participantId] += payoff(hub.design, a.action, b.action);
    if (b.participantId && b.source !== 'computer') out[b.participantId] += payoff(hub.design, b.action, a.action);
  }
  return out;
}

function rebuildOf(hub: TestHub): EngineState {
  return rebuild(hub.design, hub.seed, hub.participants, hub.choices, hub.log, { sessionId: hub.sessionId });
}

/** Checks every completed session must pass. */
function checkCompleted(hub: TestHub): void {
  const s = hub.state;
  expect(s.status).toBe('complete');
  const draws = drawSequence(hub.seed, hub.design.delta, hub.design.supergames, hub.design.termination).supergames;
  // one row per seat and round, each with a known source
  const keys = new Set(hub.choices.map((r) => `${r.pairId}:${r.round}:${r.seat}`));
  expect(keys.size).toBe(hub.choices.length);
  hub.choices.forEach((r) => expect(['player', 'timeout', 'computer']).toContain(r.source));
  // the draws are common to all pairs: every pair of supergame s plays exactly its roundsPlayed
  for (const sum of s.summaries) {
    const sg = draws[sum.supergame - 1];
    expect(sum.length).toBe(sg.length);
    const rows = hub.choices.filter((r) => r.supergame === sum.supergame);
    const pairs = new Set(rows.map((r) => r.pairId));
    expect(pairs.size).toBe(sum.pairs);
    for (const pairId of pairs) {
      expect(rows.filter((r) => r.pairId === pairId)).toHaveLength(2 * sg.roundsPlayed);
    }
  }
  const fromRows = pointsFromRows(hub);
  for (const id of s.joinOrder) expect(s.participants[id].points).toBe(fromRows[id]);
  expect(logical(rebuildOf(hub))).toEqual(logical(s));
}

function startSession(n: number, over: Partial<DesignInput> = {}, seed: string | number = 'engine'): { hub: TestHub; ids: string[] } {
  const hub = new TestHub(makeDesign(over), seed);
  hub.ok({ type: 'open' }, T0);
  const ids = joinAll(hub, n);
  hub.ok({ type: 'start' }, hub.now + SEC);
  return { hub, ids };
}

/** A seed whose first supergame lasts at least `min` rounds (searched, so the test needs no luck). */
function seedWithLength(delta: number, min: number): number {
  for (let seed = 1; ; seed++) if (supergameDraws(seed, delta, 1).length >= min) return seed;
}

function humanPairsOf(hub: TestHub, supergame: number): string[] {
  const bySeat = new Map<string, (string | null)[]>();
  for (const r of hub.choices.filter((x) => x.supergame === supergame && x.round === 1)) {
    const seats = bySeat.get(r.pairId) ?? [null, null];
    seats[r.seat] = r.participantId;
    bySeat.set(r.pairId, seats);
  }
  return [...bySeat.values()].filter((p) => p[0] && p[1]).map((p) => [p[0], p[1]].sort().join('|'));
}

describe('whole sessions played with seeded random choices', () => {
  it('2 participants, 4 supergames: the same pair each time, as it must be', () => {
    const { hub } = startSession(2, { supergames: 4 }, 2);
    play(hub, rngOf(2));
    checkCompleted(hub);
    expect(hub.state.summaries).toHaveLength(4);
  });

  it('3 participants with a disclosed computer partner (TFT) that rotates', () => {
    const { hub, ids } = startSession(3, { supergames: 6, oddCount: { kind: 'computer', strategy: 'TFT' } }, 3);
    play(hub, rngOf(3));
    checkCompleted(hub);
    const computerRows = hub.choices.filter((r) => r.participantId === null);
    expect(computerRows.length).toBeGreaterThan(0);
    computerRows.forEach((r) => expect(r).toMatchObject({ source: 'computer', strategy: 'TFT' }));
    // the computer chooses the moment its round opens
    for (const r of computerRows) {
      const partner = hub.choices.find((x) => x.pairId === r.pairId && x.round === r.round && x.seat !== r.seat)!;
      expect(r.at).toBeLessThanOrEqual(partner.at);
    }
    // rotation, fewest-times-first: 6 supergames → each of the 3 twice
    expect(ids.map((id) => hub.state.participants[id].oddCount)).toEqual([2, 2, 2]);
  });

  it('3 participants with a rotating sit-out', () => {
    const { hub, ids } = startSession(3, { supergames: 3, oddCount: { kind: 'sit-out' } }, 33);
    const sat: string[] = [];
    play(hub, rngOf(33), {
      stopWhen: (h) => {
        for (const id of ids) {
          const v = participantView(h.state, id);
          if (v.notice === 'sitting-out' && !sat.includes(`${v.supergame}:${id}`)) sat.push(`${v.supergame}:${id}`);
        }
        return false;
      },
    });
    checkCompleted(hub);
    expect(hub.choices.every((r) => r.participantId !== null)).toBe(true);
    expect(ids.map((id) => hub.state.participants[id].oddCount)).toEqual([1, 1, 1]);
    expect(sat.map((x) => x.split(':')[0]).sort()).toEqual(['1', '2', '3']);
  });

  it('7 participants, 7 supergames: perfect strangers throughout (round-robin with a bye)', () => {
    const { hub } = startSession(7, { supergames: 7, oddCount: { kind: 'sit-out' } }, 7);
    play(hub, rngOf(7));
    checkCompleted(hub);
    const all = [1, 2, 3, 4, 5, 6, 7].flatMap((s) => humanPairsOf(hub, s));
    expect(all).toHaveLength(21);
    expect(new Set(all).size).toBe(21);
  });

  it('40 participants, 6 supergames, with timeouts: no repeat partners, rows and points consistent', () => {
    const { hub } = startSession(40, { supergames: 6 }, 40);
    // the only refusals: phones that answer after the timeout filled their choice
    const errors = play(hub, rngOf(40), { lateProb: 80 });
    expect(errors.length).toBeGreaterThan(0);
    expect(new Set(errors)).toEqual(new Set(['already-chosen']));
    checkCompleted(hub);
    const all = [1, 2, 3, 4, 5, 6].flatMap((s) => humanPairsOf(hub, s));
    expect(new Set(all).size).toBe(all.length);
    expect(hub.choices.some((r) => r.source === 'timeout')).toBe(true);
  });

  it('uses the session draws for every pair and stores them when the session opens', () => {
    const { hub } = startSession(6, { supergames: 3 }, 'draws');
    const stored = hub.effects.find((e): e is Extract<Effect, { type: 'persist-draws' }> => e.type === 'persist-draws')!;
    expect(stored.supergames).toEqual(drawSequence('draws', 0.75, 3).supergames);
    const seen: Record<string, number[]> = {};
    play(hub, rngOf(6), {
      stopWhen: (h) => {
        for (const id of h.state.supergame!.pairIds) seen[id] = h.state.pairs[id].rounds.map((r) => r.draw);
        return false;
      },
    });
    for (const [pairId, draws] of Object.entries(seen)) {
      const s = Number(pairId.slice(1, pairId.indexOf('-')));
      expect(stored.supergames[s - 1].draws.slice(0, draws.length)).toEqual(draws);
    }
  });

  it('block termination (k = 3): rounds after the end are played, not paid, and revealed at block ends', () => {
    const seed = seedWithLength(0.75, 2);
    const { hub, ids } = startSession(4, { supergames: 3, termination: { kind: 'block', k: 3 } }, seed);
    const sg1 = supergameDraws(seed, 0.75, 1, { kind: 'block', k: 3 });
    const [a, b] = hub.state.pairs['s1-p1'].seats.map((x) => x.participantId!);
    hub.ok({ type: 'choose', participantId: a, supergame: 1, round: 1, action: 'C', clientChoiceId: 'a1' }, hub.now + SEC);
    hub.ok({ type: 'choose', participantId: b, supergame: 1, round: 1, action: 'D', clientChoiceId: 'b1' }, hub.now + SEC);
    const mid = participantView(hub.state, a);
    expect(mid.history[0]).toMatchObject({ own: 'C', partner: 'D', ownPayoff: 12, draw: null, paid: null });
    expect(mid.lastResult?.draw).toBeNull();
    expect(mid.blockNotice).toBeNull();
    play(hub, rngOf(44));
    checkCompleted(hub);
    expect(sg1.roundsPlayed % 3).toBe(0);
    const unpaid = hub.choices.filter((r) => r.round > supergameDraws(seed, 0.75, r.supergame).length);
    const sgs = [1, 2, 3].map((s) => supergameDraws(seed, 0.75, s, { kind: 'block', k: 3 }));
    expect(unpaid.length).toBe(sgs.reduce((acc, s) => acc + 4 * (s.roundsPlayed - s.length), 0));
    const end = participantView(hub.state, ids[0]);
    expect(end.status).toBe('finished');
  });
});

describe('choices: idempotence and error codes', () => {
  it('returns the same stored row for an identical resubmission, and for a changed one', () => {
    const { hub } = startSession(4, { supergames: 2 }, seedWithLength(0.75, 2));
    const [a, b] = hub.state.pairs['s1-p1'].seats.map((x) => x.participantId!);
    const choose = { type: 'choose', participantId: a, supergame: 1, round: 1, action: 'C', clientChoiceId: 'c-1' } as const;
    const first = hub.ok(choose, hub.now + 2 * SEC);
    expect(first.effects[0]).toEqual({ type: 'persist-choice', row: first.row });
    const before = hub.state;
    const again = step(before, choose, hub.now + 3 * SEC);
    expect(again.error?.code).toBe('already-chosen');
    expect(again.row).toEqual(first.row);
    expect(again.state).toBe(before);
    expect(again.effects).toEqual([]);
    const changed = step(before, { ...choose, action: 'D', clientChoiceId: 'c-2' }, hub.now + 3 * SEC);
    expect(changed.error?.code).toBe('already-chosen');
    expect(changed.row?.action).toBe('C');
    // still idempotent after the round has resolved
    hub.ok({ ...choose, participantId: b, clientChoiceId: 'c-b' }, hub.now + 4 * SEC);
    expect(hub.state.pairs['s1-p1'].round).toBe(2);
    expect(step(hub.state, choose, hub.now).row).toEqual(first.row);
  });

  it('answers every error with its code and leaves the state alone', () => {
    const design = makeDesign({ supergames: 3, oddCount: { kind: 'sit-out' } });
    let s = createSession({ sessionId: 'e', design, seed: seedWithLength(0.75, 2) });
    let t = T0;
    const run = (ev: Parameters<typeof step>[1], code?: string) => {
      t += SEC;
      const res = step(s, ev, t);
      if (code) {
        expect(res.error?.code).toBe(code);
        expect(res.state).toBe(s);
        expect(res.effects).toEqual([]);
      } else {
        expect(res.error).toBeUndefined();
        s = res.state;
      }
      return res;
    };
    run({ type: 'start' }, 'illegal-transition');
    run({ type: 'join', participantId: 'x' }, 'session-not-joinable');
    run({ type: 'open' });
    run({ type: 'open' }, 'illegal-transition');
    run({ type: 'pause' }, 'illegal-transition');
    run({ type: 'join', participantId: 'a' });
    run({ type: 'start' }, 'too-few-participants');
    for (const id of ['b', 'c', 'd', 'e']) run({ type: 'join', participantId: id });
    run({ type: 'handToComputer', participantId: 'a', strategy: 'TFT' }, 'session-not-running');
    run({ type: 'start' });
    run({ type: 'resume' }, 'illegal-transition');
    run({ type: 'archive' }, 'illegal-transition');
    const sitter = s.joinOrder.find((id) => s.participants[id].sittingOut)!;
    const pair = s.pairs['s1-p1'];
    const [p, q] = pair.seats.map((x) => x.participantId!);
    const other = s.pairs['s1-p2'].seats[0].participantId!;
    const ch = (who: string, over: object = {}) =>
      ({ type: 'choose', participantId: who, supergame: 1, round: 1, action: 'C', clientChoiceId: `${who}-x`, ...over }) as const;
    run(ch('stranger'), 'not-a-participant');
    run(ch(sitter), 'not-your-pair');
    run(ch(p, { pairId: 's1-p2' }), 'not-your-pair');
    run(ch(p, { round: 2 }), 'round-not-open');
    run(ch(p, { supergame: 2 }), 'round-not-open');
    run(ch(p, { action: 'X' as Action }), 'bad-event');
    run({ type: 'timeout', pairId: 'nope', round: 1 }, 'unknown-pair');
    run({ type: 'timeout', pairId: pair.id, round: 1 }, 'timer-not-due');
    run({ type: 'handToComputer', participantId: other, strategy: 'Nice' }, 'unknown-strategy');
    run({ type: 'reconnect', participantId: 'stranger' }, 'not-a-participant');
    run(ch(p));
    run(ch(q));
    run(ch(p, { clientChoiceId: 'again' }), 'already-chosen');
    run({ type: 'timeout', pairId: pair.id, round: 1 }, 'round-closed');
    run({ type: 'timeout', pairId: pair.id, round: 3 }, 'round-not-open');
    run({ type: 'handToComputer', participantId: other, strategy: 'TFT' });
    run({ type: 'handToComputer', participantId: other, strategy: 'TFT' }, 'already-handed');
    run(ch(other), 'already-chosen'); // the computer already chose round 1 for the seat
    run(ch(other, { round: 2 }), 'handed-to-computer');
    run({ type: 'remove', participantId: p });
    run(ch(p, { round: 2 }), 'not-a-participant');
    run({ type: 'join', participantId: p }, 'not-a-participant');
    run({ type: 'pause' });
    run(ch(q, { round: 2 }), 'session-not-running');
    run({ type: 'timeout', pairId: pair.id, round: 2 }, 'session-not-running');
    run({ type: 'endNow' });
    run({ type: 'endNow' }, 'illegal-transition');
    run({ type: 'join', participantId: 'late' }, 'session-not-joinable');
    run(ch(q, { round: 2 }), 'session-not-running');
    run({ type: 'archive' });
    run({ type: 'resume' }, 'illegal-transition');
    expect(s.status).toBe('archived');
  });

  it('resolves a round the same way whichever choice arrives first (racing processes)', () => {
    const { hub } = startSession(2, { supergames: 1, delta: 0.9 }, seedWithLength(0.9, 2));
    const [a, b] = hub.state.pairs['s1-p1'].seats.map((x) => x.participantId!);
    const ca = { type: 'choose', participantId: a, supergame: 1, round: 1, action: 'C', clientChoiceId: 'a' } as const;
    const cb = { type: 'choose', participantId: b, supergame: 1, round: 1, action: 'D', clientChoiceId: 'b' } as const;
    const tA = hub.now + 3 * SEC;
    const tB = hub.now + 5 * SEC;
    // each row keeps the time its own process stamped; the later-stamped one may be applied first
    const ab = step(step(hub.state, ca, tA).state, cb, tB).state;
    const ba = step(step(hub.state, cb, tB).state, ca, tA).state;
    expect(ba.pairs['s1-p1'].rounds).toEqual(ab.pairs['s1-p1'].rounds);
    expect(ab.pairs['s1-p1'].rounds[0].resolvedAt).toBe(tB);
    expect(ba.pairs['s1-p1'].deadline).toBe(ab.pairs['s1-p1'].deadline);
    expect(ba.pairs['s1-p1'].openedAt).toBe(tB);
    for (const id of [a, b]) expect(ba.participants[id].points).toBe(ab.participants[id].points);
  });

  it('closes rounds of earlier supergames', () => {
    const { hub, ids } = startSession(2, { supergames: 3 }, 5);
    play(hub, rngOf(5), { stopWhen: (h) => h.state.supergame!.number === 2 });
    const res = step(
      hub.state,
      { type: 'choose', participantId: ids[0], supergame: 1, round: 40, action: 'C', clientChoiceId: 'old' },
      hub.now,
    );
    expect(res.error?.code).toBe('round-closed');
  });
});

describe('timers', () => {
  it('pause freezes the time left and cancels timers; resume reschedules; decision times exclude the pause', () => {
    const { hub } = startSession(2, { supergames: 2, roundSeconds: 20 }, seedWithLength(0.75, 2));
    const pair = hub.state.pairs['s1-p1'];
    const start = pair.openedAt;
    const key = `sess-1:s1-p1:1`;
    expect(hub.timers.get(key)).toEqual({ at: start + 20 * SEC, event: { type: 'timeout', pairId: 's1-p1', round: 1 } });
    const paused = hub.ok({ type: 'pause' }, start + 5 * SEC);
    expect(paused.effects).toContainEqual({ type: 'cancel-timer', key });
    expect(hub.timers.size).toBe(0);
    expect(hub.state.pairs['s1-p1']).toMatchObject({ deadline: null, remainingMs: 15 * SEC });
    const a = pair.seats[0].participantId!;
    expect(participantView(hub.state, a)).toMatchObject({ paused: true, remainingMs: 15 * SEC, deadline: null, status: 'choosing' });
    const resumed = hub.ok({ type: 'resume' }, start + 65 * SEC);
    expect(resumed.effects).toContainEqual({
      type: 'schedule-timer',
      key,
      at: start + 80 * SEC,
      event: { type: 'timeout', pairId: 's1-p1', round: 1 },
    });
    const res = hub.ok({ type: 'choose', participantId: a, supergame: 1, round: 1, action: 'D', clientChoiceId: 'a' }, start + 70 * SEC);
    expect(res.row?.decisionMs).toBe(10 * SEC); // 70 s on the clock, 60 s of it paused
    hub.advanceTo(start + 80 * SEC);
    const rows = hub.choices.filter((r) => r.round === 1);
    expect(rows.map((r) => r.source).sort()).toEqual(['player', 'timeout']);
  });

  it('tick fires timeouts whose timer was lost, and is silent otherwise', () => {
    const { hub } = startSession(2, { supergames: 1 }, 8);
    const deadline = hub.state.pairs['s1-p1'].deadline!;
    expect(step(hub.state, { type: 'tick' }, deadline - 1).effects).toEqual([]);
    const res = step(hub.state, { type: 'tick' }, deadline + 5);
    expect(res.effects.filter((e) => e.type === 'persist-choice')).toHaveLength(2);
    expect(res.state.pairs['s1-p1'].rounds[0].sources).toEqual(['timeout', 'timeout']);
  });
});

describe('timeout rules fill the missing choice and flag the row', () => {
  /** round 1: first seat C, second seat D by hand; round 2: both time out */
  function round2Timeouts(over: Partial<DesignInput>): { r1: StoredChoice[]; r2: StoredChoice[]; hub: TestHub } {
    const { hub } = startSession(2, { supergames: 1, delta: 0.9, ...over }, seedWithLength(0.9, 3));
    const [a, b] = hub.state.pairs['s1-p1'].seats.map((x) => x.participantId!);
    hub.ok({ type: 'choose', participantId: a, supergame: 1, round: 1, action: 'C', clientChoiceId: 'a1' }, hub.now + SEC);
    hub.ok({ type: 'choose', participantId: b, supergame: 1, round: 1, action: 'D', clientChoiceId: 'b1' }, hub.now + SEC);
    hub.advanceTo(hub.state.pairs['s1-p1'].deadline!);
    const rows = (r: number) => hub.choices.filter((x) => x.round === r).sort((x, y) => x.seat - y.seat);
    return { r1: rows(1), r2: rows(2), hub };
  }

  it('defect / cooperate', () => {
    expect(round2Timeouts({ timeout: 'defect' }).r2.map((r) => [r.action, r.source])).toEqual([
      ['D', 'timeout'],
      ['D', 'timeout'],
    ]);
    expect(round2Timeouts({ timeout: 'cooperate' }).r2.map((r) => r.action)).toEqual(['C', 'C']);
  });

  it('repeat-last: own last action, C in round 1', () => {
    const { r2, hub } = round2Timeouts({ timeout: 'repeat-last' });
    expect(r2.map((r) => r.action)).toEqual(['C', 'D']);
    hub.advanceTo(hub.state.pairs['s1-p1'].deadline ?? hub.now);
    const { hub: fresh } = startSession(2, { supergames: 1, timeout: 'repeat-last' }, 9);
    fresh.advanceTo(fresh.state.pairs['s1-p1'].deadline!);
    expect(fresh.choices.filter((r) => r.round === 1).map((r) => [r.action, r.source])).toEqual([
      ['C', 'timeout'],
      ['C', 'timeout'],
    ]);
  });

  it('computer-strategy: what the odd-count strategy would play (methods.md §3 automata)', () => {
    // TFT copies the partner's last action: seat 0 saw D → D, seat 1 saw C → C
    const tft = round2Timeouts({ timeout: 'computer-strategy', oddCount: { kind: 'computer', strategy: 'TFT' } });
    expect(tft.r2.map((r) => [r.action, r.source, r.strategy])).toEqual([
      ['D', 'timeout', 'TFT'],
      ['C', 'timeout', 'TFT'],
    ]);
    // Grim triggers on either player's defection: both D
    const grim = round2Timeouts({ timeout: 'computer-strategy', oddCount: { kind: 'computer', strategy: 'Grim' } });
    expect(grim.r2.map((r) => r.action)).toEqual(['D', 'D']);
    expect(Object.values(grim.hub.state.participants).map((p) => p.timeouts)).toEqual([1, 1]);
    const floor = floorView(grim.hub.state, grim.hub.now);
    expect(floor.pairs[0].seats.map((x) => x.timeouts)).toEqual([1, 1]);
  });
});

describe('hand to computer, remove, late joiners', () => {
  it('hands a seat to a disclosed computer that follows the history, then drops the participant until they join again', () => {
    const { hub, ids } = startSession(4, { supergames: 3, delta: 0.9 }, seedWithLength(0.9, 3));
    const pair = hub.state.pairs['s1-p1'];
    const [a, b] = pair.seats.map((x) => x.participantId!);
    hub.ok({ type: 'choose', participantId: a, supergame: 1, round: 1, action: 'D', clientChoiceId: 'a1' }, hub.now + SEC);
    const res = hub.ok({ type: 'handToComputer', participantId: b, strategy: 'TFT' }, hub.now + SEC);
    const row = res.effects.find((e): e is Extract<Effect, { type: 'persist-choice' }> => e.type === 'persist-choice')!.row;
    expect(row).toMatchObject({ participantId: b, source: 'computer', strategy: 'TFT', action: 'C', round: 1 });
    expect(hub.log.map((l) => l.event.type)).toContain('handToComputer');
    // round 2: TFT answers a's D with D, at once
    const r2 = hub.choices.find((r) => r.participantId === b && r.round === 2)!;
    expect(r2).toMatchObject({ action: 'D', source: 'computer' });
    expect(participantView(hub.state, a).partner).toEqual({ kind: 'computer', strategy: 'TFT', reason: 'hand-over', fromRound: 1 });
    expect(participantView(hub.state, b)).toMatchObject({ status: 'between-supergames', notice: 'handed-to-computer' });
    play(hub, rngOf(1), { stopWhen: (h) => h.state.supergame!.number === 2 });
    expect(hub.state.participants[b].pairId).toBeNull();
    expect(floorView(hub.state, hub.now).others).toContainEqual({ participantId: b, pseudonym: 'P-002', why: 'handed', connected: false });
    // back again: enters at the next supergame, like a late joiner
    hub.ok({ type: 'join', participantId: b }, hub.now + SEC);
    expect(participantView(hub.state, b)).toMatchObject({ status: 'lobby', notice: 'waiting-to-enter' });
    play(hub, rngOf(2), { stopWhen: (h) => h.state.supergame!.number === 3 });
    expect(hub.state.participants[b].pairId).not.toBeNull();
    play(hub, rngOf(3));
    checkCompleted(hub);
    expect(ids).toContain(b);
  });

  it('remove: the partner finishes against a disclosed computer; the removed participant is out', () => {
    const { hub } = startSession(4, { supergames: 2, oddCount: { kind: 'computer', strategy: 'Grim' } }, 12);
    const [a, b] = hub.state.pairs['s1-p1'].seats.map((x) => x.participantId!);
    hub.ok({ type: 'remove', participantId: b }, hub.now + SEC);
    expect(participantView(hub.state, a).partner).toMatchObject({ kind: 'computer', strategy: 'Grim' });
    expect(participantView(hub.state, b)).toMatchObject({ status: 'finished', notice: 'removed' });
    play(hub, rngOf(12));
    checkCompleted(hub);
    expect(hub.choices.some((r) => r.participantId === b && r.supergame === 2)).toBe(false);
  });

  it('late joiners wait in the lobby and enter at the next supergame', () => {
    const { hub } = startSession(4, { supergames: 3, oddCount: { kind: 'sit-out' } }, 21);
    hub.ok({ type: 'join', participantId: 'late' }, hub.now + SEC);
    expect(hub.state.participants.late).toMatchObject({ pseudonym: 'P-005', entersAt: 2 });
    expect(participantView(hub.state, 'late')).toMatchObject({ status: 'lobby', notice: 'waiting-to-enter', supergame: 1 });
    const ch = step(
      hub.state,
      { type: 'choose', participantId: 'late', supergame: 1, round: 1, action: 'C', clientChoiceId: 'l' },
      hub.now,
    );
    expect(ch.error?.code).toBe('not-your-pair');
    play(hub, rngOf(21), { stopWhen: (h) => h.state.supergame!.number === 2 });
    const five = hub.state.joinOrder.filter((id) => hub.state.participants[id].pairId || hub.state.participants[id].sittingOut);
    expect(five).toHaveLength(5);
    play(hub, rngOf(22));
    checkCompleted(hub);
    expect(hub.choices.some((r) => r.participantId === 'late' && r.supergame === 1)).toBe(false);
  });
  it('nobody new joins once no supergame is left to enter: the last one is running, or the session ends after this one', () => {
    // Before the fix the engine admitted them, and they waited for a supergame that never came.
    const last = startSession(4, { supergames: 2 }, 23).hub;
    play(last, rngOf(23), { stopWhen: (h) => h.state.supergame!.number === 2 });
    const joined = step(last.state, { type: 'join', participantId: 'late' }, last.now + SEC);
    expect(joined.error?.code).toBe('session-not-joinable');
    expect(joined.error?.message).toMatch(/last supergame/);
    expect(last.state.participants.late).toBeUndefined();
    expect(bigScreenView(last.state).lateEntry).toBeNull();

    const ending = startSession(4, { supergames: 5 }, 24).hub;
    ending.ok({ type: 'endAfterSupergame' }, ending.now + SEC);
    expect(step(ending.state, { type: 'join', participantId: 'late' }, ending.now + SEC).error?.code).toBe('session-not-joinable');
    // someone already in the session who reconnects is not a new joiner
    const p = ending.state.joinOrder[0];
    expect(step(ending.state, { type: 'join', participantId: p }, ending.now + SEC).error).toBeUndefined();
  });
});

describe('ending a session', () => {
  it('end after this supergame completes at the boundary', () => {
    const { hub } = startSession(6, { supergames: 5 }, 31);
    play(hub, rngOf(31), { stopWhen: (h) => h.state.supergame!.number === 2 });
    hub.ok({ type: 'endAfterSupergame' }, hub.now + SEC);
    expect(floorView(hub.state, hub.now).endAfterSupergame).toBe(true);
    play(hub, rngOf(32));
    checkCompleted(hub);
    expect(hub.state.summaries.map((x) => x.supergame)).toEqual([1, 2]);
    hub.ok({ type: 'archive' }, hub.now + SEC);
    expect(hub.state.status).toBe('archived');
  });

  it('end now completes at once, cancels the open timers and keeps what was played', () => {
    const { hub, ids } = startSession(6, { supergames: 5 }, 41);
    play(hub, rngOf(41), { stopWhen: (h) => h.choices.length >= 9 });
    const open = hub.state.supergame!.pairIds.filter((id) => !hub.state.pairs[id].done);
    const res = hub.ok({ type: 'endNow' }, hub.now + SEC);
    for (const id of open) {
      expect(res.effects).toContainEqual({ type: 'cancel-timer', key: `sess-1:${id}:${hub.state.pairs[id].round}` });
    }
    expect(hub.timers.size).toBe(0);
    expect(hub.state.summaries[hub.state.summaries.length - 1].truncated).toBe(true);
    expect(participantView(hub.state, ids[0])).toMatchObject({ status: 'finished', notice: 'ended-early' });
    const fromRows = pointsFromRows(hub);
    for (const id of ids) expect(hub.state.participants[id].points).toBe(fromRows[id]);
    expect(logical(rebuildOf(hub))).toEqual(logical(hub.state));
  });
});

describe('rebuild from stored rows', () => {
  it('equals the live state mid-round after a crash, and re-arms the timers with the time left', () => {
    const { hub } = startSession(40, { supergames: 4 }, 'crash');
    play(hub, rngOf(77), { stopWhen: (h) => h.choices.length >= 230 });
    const crashAt = hub.now;
    const rebuilt = rebuildOf(hub);
    expect(logical(rebuilt)).toEqual(logical(hub.state));
    const rearm = resumeEffects(rebuilt);
    const live = [...hub.timers.entries()].map(([key, t]) => ({ type: 'schedule-timer', key, at: t.at, event: t.event }));
    expect(rearm.length).toBeGreaterThan(0);
    expect(new Set(rearm.map((e) => JSON.stringify(e)))).toEqual(new Set(live.map((e) => JSON.stringify(e))));
    for (const e of rearm) if (e.type === 'schedule-timer') expect(e.at).toBeGreaterThan(crashAt - 20 * SEC);
  });

  it('equals the live state after a crash while paused; resuming both gives the same effects', () => {
    const { hub } = startSession(7, { supergames: 3 }, 'paused-crash');
    play(hub, rngOf(78), { stopWhen: (h) => h.choices.length >= 12 });
    hub.ok({ type: 'pause' }, hub.now + 3 * SEC);
    const rebuilt = rebuildOf(hub);
    expect(logical(rebuilt)).toEqual(logical(hub.state));
    expect(resumeEffects(rebuilt)).toEqual([]);
    const at = hub.now + 120 * SEC;
    const a = step(hub.state, { type: 'resume' }, at);
    const b = step(rebuilt, { type: 'resume' }, at);
    expect(b.effects.filter((e) => e.type !== 'broadcast')).toEqual(a.effects.filter((e) => e.type !== 'broadcast'));
    expect(logical(b.state)).toEqual(logical(a.state));
  });

  it('refuses rows that disagree with the engine', () => {
    const { hub } = startSession(3, { supergames: 2 }, 'tamper');
    play(hub, rngOf(79));
    const computerRow = hub.choices.findIndex((r) => r.source === 'computer');
    const flipped = hub.choices.map((r, i) => (i === computerRow ? { ...r, action: r.action === 'C' ? 'D' : 'C' } : r)) as StoredChoice[];
    expect(() => rebuild(hub.design, hub.seed, hub.participants, flipped, hub.log, { sessionId: hub.sessionId })).toThrow(/differs/);
    // a row missing from the middle: later rows cannot be replayed (a missing LAST row is not an
    // error — it is what a crash before that choice looks like)
    const firstPlayer = hub.choices.findIndex((r) => r.source === 'player');
    const gap = hub.choices.filter((_, i) => i !== firstPlayer);
    expect(() => rebuild(hub.design, hub.seed, hub.participants, gap, hub.log, { sessionId: hub.sessionId })).toThrow(RebuildError);
    const withoutLast = hub.choices.slice(0, -1);
    expect(hub.choices[hub.choices.length - 1].source).toBe('player');
    expect(rebuild(hub.design, hub.seed, hub.participants, withoutLast, hub.log, { sessionId: hub.sessionId }).status).toBe('running');
  });
});

describe('views', () => {
  it('the phone shows the payoff table, its own history and the draw sentence, never the partner’s pseudonym', () => {
    const { hub } = startSession(4, { supergames: 2, delta: 0.9 }, seedWithLength(0.9, 2));
    const [a, b] = hub.state.pairs['s1-p1'].seats.map((x) => x.participantId!);
    let v = participantView(hub.state, a);
    expect(v).toMatchObject({
      status: 'choosing',
      supergame: 1,
      supergames: 2,
      round: 1,
      partner: { kind: 'human' },
      labels: { C: 'X', D: 'Y' },
      cutoff: '90',
    });
    expect(v.payoffTable).toEqual([
      { own: 'C', partner: 'C', ownPoints: 48, partnerPoints: 48 },
      { own: 'C', partner: 'D', ownPoints: 12, partnerPoints: 50 },
      { own: 'D', partner: 'C', ownPoints: 50, partnerPoints: 12 },
      { own: 'D', partner: 'D', ownPoints: 25, partnerPoints: 25 },
    ]);
    hub.ok({ type: 'choose', participantId: a, supergame: 1, round: 1, action: 'C', clientChoiceId: 'a1' }, hub.now + SEC);
    expect(participantView(hub.state, a).status).toBe('waiting-partner');
    expect(participantView(hub.state, b).partnerHasChosen).toBe(true);
    hub.ok({ type: 'choose', participantId: b, supergame: 1, round: 1, action: 'D', clientChoiceId: 'b1' }, hub.now + SEC);
    v = participantView(hub.state, a);
    const draw = hub.state.pairs['s1-p1'].rounds[0].draw;
    expect(v.lastResult).toMatchObject({
      own: 'C',
      partner: 'D',
      ownPayoff: 12,
      partnerPayoff: 50,
      draw,
      drawSentence: `Draw ${draw} — another round, because it is ≤ 90`,
    });
    expect(v.history).toEqual([
      {
        round: 1,
        own: 'C',
        partner: 'D',
        ownPayoff: 12,
        partnerPayoff: 50,
        ownSource: 'player',
        draw,
        paid: true,
        sentence: v.lastResult!.drawSentence,
      },
    ]);
    expect(v.totalPoints).toBe(12);
    const text = JSON.stringify(v);
    expect(text).not.toContain(b);
    expect(text).not.toContain(hub.state.participants[b].pseudonym);
  });

  it('the floor shows pseudonyms, who has chosen, waiting time and connection alerts', () => {
    const { hub, ids } = startSession(4, { supergames: 1, roundSeconds: 20 }, 50);
    expect(ids.map((id) => hub.state.participants[id].pseudonym)).toEqual(['P-001', 'P-002', 'P-003', 'P-004']);
    const [a] = hub.state.pairs['s1-p1'].seats.map((x) => x.participantId!);
    hub.ok({ type: 'reconnect', participantId: a }, hub.now + SEC);
    const choseAt = hub.now + SEC;
    hub.ok({ type: 'choose', participantId: a, supergame: 1, round: 1, action: 'C', clientChoiceId: 'a' }, choseAt);
    hub.ok({ type: 'disconnect', participantId: ids[3] }, hub.now + SEC);
    const opened = hub.state.pairs['s1-p1'].openedAt;
    const f = floorView(hub.state, opened + 11 * SEC);
    const seat = f.pairs[0].seats.find((x) => x.participantId === a)!;
    expect(seat).toMatchObject({ hasChosen: true, source: 'player', connected: true, pseudonym: hub.state.participants[a].pseudonym });
    // The pair waits from its first choice (issue 12), not from the round's opening; a pair where
    // nobody has chosen waits for no one yet.
    expect(choseAt).toBeGreaterThan(opened);
    expect(f.pairs[0].waitingSince).toBe(choseAt);
    expect(f.pairs[1].waitingSince).toBeNull();
    expect(f.pairs.map((p) => p.number)).toEqual([1, 2]);
    expect(f.alerts).toContainEqual({ participantId: ids[3], pseudonym: 'P-004', kind: 'disconnected' });
    expect(f.alerts.filter((x) => x.kind === 'slow')).toHaveLength(3); // 11 s of a 20 s timer, not chosen
    expect(f.counts).toMatchObject({ joined: 4, present: 4, connected: 1, pairs: 2, pairsDone: 0 });
  });

  it('the big screen shows supergame k of N, pairs done and cooperation by round, with no individual data', () => {
    const { hub, ids } = startSession(8, { supergames: 3 }, 60);
    play(hub, rngOf(60), { stopWhen: (h) => h.state.supergame!.number === 2 && h.choices.filter((r) => r.supergame === 2).length >= 8 });
    const v = bigScreenView(hub.state);
    expect(v).toMatchObject({ supergame: 2, supergames: 3, pairs: 4, joined: 8 });
    expect(v.bySupergame).toHaveLength(1);
    expect(v.cooperationByRound[0].round).toBe(1);
    const text = JSON.stringify(v);
    for (const id of ids) {
      expect(text).not.toContain(id);
      expect(text).not.toContain(hub.state.participants[id].pseudonym);
    }
    const broadcast = hub.effects.filter((e) => e.type === 'broadcast' && e.room === 'session:sess-1');
    expect(broadcast.length).toBeGreaterThan(0);
  });

  it('broadcasts to the participant, staff and session rooms', () => {
    const { hub, ids } = startSession(2, { supergames: 1 }, 61);
    const res = hub.ok({ type: 'choose', participantId: ids[0], supergame: 1, round: 1, action: 'C', clientChoiceId: 'z' }, hub.now + SEC);
    const rooms = res.effects.filter((e) => e.type === 'broadcast').map((e) => (e as Extract<Effect, { type: 'broadcast' }>).room);
    expect(rooms.sort()).toEqual([`participant:sess-1:${ids[0]}`, `participant:sess-1:${ids[1]}`, 'session:sess-1', 'staff:sess-1'].sort());
    // persist first, then timers, then broadcasts: the hub can commit before it tells anyone
    const kinds = res.effects.map((e) => e.type);
    expect(kinds.indexOf('persist-choice')).toBe(0);
    expect(kinds.lastIndexOf('persist-choice')).toBeLessThan(kinds.indexOf('broadcast'));
  });
});

describe('large sessions', () => {
  it('views: "none" builds no views and says whose view changed, for the runner to build once per batch', () => {
    const { hub, ids } = startSession(2, { supergames: 1 }, 62);
    const res = step(
      hub.state,
      { type: 'choose', participantId: ids[0], supergame: 1, round: 1, action: 'C', clientChoiceId: 'r' },
      hub.now + SEC,
      {
        views: 'none',
      },
    );
    expect(res.effects.filter((e) => e.type === 'broadcast')).toEqual([]);
    expect(res.effects.filter((e) => e.type === 'persist-choice')).toHaveLength(1);
    // the chooser's view changed, and the partner's (the pair's "waiting for partner" line)
    expect([...res.touched].sort()).toEqual([...ids].sort());
    const full = step(
      hub.state,
      { type: 'choose', participantId: ids[0], supergame: 1, round: 1, action: 'C', clientChoiceId: 'r' },
      hub.now + SEC,
    );
    expect(full.touched).toEqual(res.touched);
    expect(full.effects.filter((e) => e.type !== 'broadcast')).toEqual(res.effects);
  });
});

describe("a batch of steps (the runner's group commit)", () => {
  it('gives the same state and rows as single steps, errors included, and never touches the state it started from', () => {
    const { hub, ids } = startSession(40, { supergames: 3 }, 'batch');
    const start = hub.state;
    const frozen = structuredClone(start);
    const at = hub.now + 2 * SEC;
    const events: EngineEvent[] = [];
    ids.forEach((id, i) => {
      events.push({ type: 'choose', participantId: id, supergame: 1, round: 1, action: i % 3 ? 'C' : 'D', clientChoiceId: `b-${id}` });
      // refused ones between them: a changed retry, a future round, a stranger, an early timer
      if (i % 7 === 0)
        events.push({ type: 'choose', participantId: id, supergame: 1, round: 1, action: 'D', clientChoiceId: `other-${id}` });
      if (i % 11 === 0)
        events.push({ type: 'choose', participantId: id, supergame: 1, round: 9, action: 'C', clientChoiceId: `late-${id}` });
      if (i % 13 === 0)
        events.push({ type: 'choose', participantId: 'stranger', supergame: 1, round: 1, action: 'C', clientChoiceId: 'x-stranger' });
      if (i % 17 === 0) events.push({ type: 'timeout', pairId: 's1-p1', round: 1 });
    });
    const run = (batch: boolean) => {
      const scope = newBatchScope();
      let state = start;
      const rows: unknown[] = [];
      const errors: (string | undefined)[] = [];
      events.forEach((e, k) => {
        const res = step(state, e, at + k, batch ? { views: 'none', batch: scope } : { views: 'none' });
        errors.push(res.error?.code);
        if (!res.error) state = res.state;
        rows.push(...res.effects.filter((x) => x.type.startsWith('persist-')));
      });
      return { state, rows, errors };
    };
    const single = run(false);
    const batched = run(true);
    expect(batched.errors).toEqual(single.errors);
    expect(single.errors.filter(Boolean).length).toBeGreaterThan(5);
    expect(batched.rows).toEqual(single.rows);
    expect(logical(batched.state)).toEqual(logical(single.state));
    expect(start).toEqual(frozen);
  });
});

describe('points after a hand-over', () => {
  it('credits a handed-over participant with the rounds they played, not the computer’s; the partner gets every round', () => {
    const { hub, ids } = startSession(2, { supergames: 1, delta: 0.95 }, 'handed-pay');
    const [a, b] = ids;
    hub.ok({ type: 'choose', participantId: a, supergame: 1, round: 1, action: 'C', clientChoiceId: 'a1' }, hub.now + SEC);
    hub.ok({ type: 'choose', participantId: b, supergame: 1, round: 1, action: 'C', clientChoiceId: 'b1' }, hub.now + SEC);
    hub.ok({ type: 'handToComputer', participantId: b, strategy: 'ALLD' }, hub.now + SEC);
    for (let k = 2; k <= 4 && hub.state.status === 'running'; k++) {
      hub.ok({ type: 'choose', participantId: a, supergame: 1, round: k, action: 'C', clientChoiceId: `a${k}` }, hub.now + SEC);
    }
    const rows = hub.choices.filter((r) => r.pairId === 's1-p1');
    // resolved rounds the computer played (it chooses at once in an open round a has not answered yet)
    const computerRounds = rows.filter((r) => r.source === 'computer' && rows.filter((x) => x.round === r.round).length === 2);
    expect(computerRounds.length).toBeGreaterThan(0);
    // Source: the payoff table of the design (R = 48, S = 12); b played round 1 only
    expect(hub.state.participants[b].points).toBe(48);
    expect(hub.state.participants[a].points).toBe(48 + 12 * computerRounds.length);
    expect(pointsFromRows(hub)).toMatchObject({ [a]: hub.state.participants[a].points, [b]: 48 });
  });
});

describe('grace after an outage or a restart', () => {
  it('gives every round still waiting its full time from now, logs it once, and a rebuild repeats it', () => {
    const { hub, ids } = startSession(4, { supergames: 2, roundSeconds: 30 }, 'grace');
    const [a] = ids;
    const pairOfA = hub.state.participants[a].pairId!;
    const other = hub.state.supergame!.pairIds.find((id) => id !== pairOfA)!;
    hub.ok({ type: 'choose', participantId: a, supergame: 1, round: 1, action: 'C', clientChoiceId: 'g-a' }, hub.now + 5 * SEC);
    const oldDeadline = hub.state.pairs[other].deadline!;
    // the database stalls past the deadline; the timer's timeout is not applied during the stall,
    // and when it comes back the runner applies grace first
    const back = oldDeadline + 20 * SEC;
    const res = hub.ok({ type: 'grace' }, back);
    expect(res.effects.filter((e) => e.type === 'persist-log')).toEqual([
      { type: 'persist-log', row: { seq: hub.state.seq, at: back, event: { type: 'grace' } } },
    ]);
    for (const id of hub.state.supergame!.pairIds) expect(hub.state.pairs[id].deadline).toBe(back + 30 * SEC);
    expect(res.effects).toContainEqual({
      type: 'schedule-timer',
      key: `sess-1:${other}:1`,
      at: back + 30 * SEC,
      event: { type: 'timeout', pairId: other, round: 1 },
    });
    // the old timer, if it still fires, is refused: nobody is timed out for a round their phone could not answer
    expect(hub.dispatch({ type: 'timeout', pairId: other, round: 1 }, back + SEC).error?.code).toBe('timer-not-due');
    expect(logical(rebuildOf(hub))).toEqual(logical(hub.state));
    // a grace with no round waiting (here: paused rounds only get their time back) stores nothing new
    hub.ok({ type: 'pause' }, back + 2 * SEC);
    const paused = hub.ok({ type: 'grace' }, back + 50 * SEC);
    expect(hub.state.pairs[other].remainingMs).toBe(30 * SEC);
    expect(paused.effects.filter((e) => e.type === 'schedule-timer')).toEqual([]);
    expect(logical(rebuildOf(hub))).toEqual(logical(hub.state));
  });

  it('stores nothing when no round is waiting (before the start, after the end)', () => {
    const hub = new TestHub(makeDesign({ supergames: 1 }), 'grace-idle');
    hub.ok({ type: 'open' });
    joinAll(hub, 2);
    const stored = (at: number) => hub.ok({ type: 'grace' }, at).effects.filter((e) => e.type !== 'broadcast');
    expect(stored(hub.now + SEC)).toEqual([]);
    hub.ok({ type: 'start' }, hub.now + SEC);
    play(hub, rngOf(5));
    expect(hub.state.status).toBe('complete');
    expect(stored(hub.now + SEC)).toEqual([]);
  });
});

describe('session states', () => {
  it('draft → open → running ⇄ paused → complete → archived', () => {
    const { hub } = startSession(2, { supergames: 1 }, 70);
    expect(hub.state.status).toBe('running');
    hub.ok({ type: 'pause' }, hub.now + SEC);
    expect(hub.state.status).toBe('paused');
    hub.ok({ type: 'resume' }, hub.now + SEC);
    hub.ok({ type: 'pause' }, hub.now + SEC);
    hub.ok({ type: 'resume' }, hub.now + SEC);
    play(hub, rngOf(70));
    expect(hub.state.status).toBe('complete');
    hub.ok({ type: 'archive' }, hub.now + SEC);
    expect(hub.log.map((l) => l.event.type)).toEqual(['open', 'start', 'pause', 'resume', 'pause', 'resume', 'archive']);
    expect(logical(rebuildOf(hub))).toEqual(logical(hub.state));
  });
});

describe('properties', () => {
  it('step never mutates its input (a whole 7-person session with pauses and a hand-over)', () => {
    const { hub, ids } = startSession(7, { supergames: 3 }, 'pure');
    hub.checkPurity = true;
    play(hub, rngOf(90), { stopWhen: (h) => h.choices.length >= 20 });
    hub.ok({ type: 'pause' }, hub.now + SEC);
    hub.ok({ type: 'handToComputer', participantId: ids[2], strategy: 'WSLS' }, hub.now + SEC);
    hub.ok({ type: 'resume' }, hub.now + SEC);
    hub.ok({ type: 'disconnect', participantId: ids[1] }, hub.now + SEC);
    play(hub, rngOf(91));
    checkCompleted(hub);
  });

  it('rebuild equals live at any stop point, for random sizes, policies, schemes and timer paths', () => {
    fc.assert(
      fc.property(
        fc.record({
          n: fc.integer({ min: 2, max: 9 }),
          seed: fc.integer({ min: 0, max: 1_000_000 }),
          stopAfter: fc.integer({ min: 1, max: 80 }),
          sitOut: fc.boolean(),
          block: fc.boolean(),
          useTick: fc.boolean(),
          timeout: fc.constantFrom('defect', 'cooperate', 'repeat-last', 'computer-strategy') as fc.Arbitrary<DesignInput['timeout']>,
        }),
        ({ n, seed, stopAfter, sitOut, block, useTick, timeout }) => {
          const { hub } = startSession(
            n,
            {
              supergames: 3,
              oddCount: sitOut ? { kind: 'sit-out' } : { kind: 'computer', strategy: 'Grim' },
              termination: block ? { kind: 'block', k: 2 } : { kind: 'standard' },
              timeout: sitOut && timeout === 'computer-strategy' ? 'defect' : timeout,
            },
            seed,
          );
          hub.useTick = useTick;
          play(hub, rngOf(seed), { lateProb: 150, stopWhen: (h) => h.choices.length >= stopAfter });
          const rebuilt = rebuildOf(hub);
          expect(logical(rebuilt)).toEqual(logical(hub.state));
          expect(resumeEffects(rebuilt)).toEqual(resumeEffects(hub.state));
          play(hub, rngOf(seed + 1), { lateProb: 150 });
          checkCompleted(hub);
        },
      ),
      { numRuns: 25 },
    );
  });
});
