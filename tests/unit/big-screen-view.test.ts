// The projector's view of a live session (issue 12, "The big screen"): who may still join, the
// draw the whole room has seen, and what the closing slide needs. Pure: engine state in, view out.
import { describe, expect, it } from 'vitest';
import type { Action } from '#app/lib/automata';
import type { DesignInput } from '#app/lib/design';
import { supergameDraws } from '#app/lib/draws';
import { bigScreenView } from '#realtime/engine/views';
import { TestHub, T0, joinAll, makeDesign, play, rngOf } from './harness';

const SEC = 1000;

function startSession(n: number, over: Partial<DesignInput>, seed: number): { hub: TestHub; ids: string[] } {
  const hub = new TestHub(makeDesign(over), seed);
  hub.ok({ type: 'open' }, T0);
  const ids = joinAll(hub, n);
  hub.ok({ type: 'start' }, hub.now + SEC);
  return { hub, ids };
}

/** Everyone who must choose in the given pairs (all pairs when omitted) chooses `action` now. */
function chooseAll(hub: TestHub, action: Action, pairIds?: string[]) {
  const s = hub.state;
  for (const id of pairIds ?? s.supergame!.pairIds) {
    // the last pair to finish a supergame starts the next one, which replaces the pairs
    const pair = hub.state.pairs[id];
    if (!pair || pair.done) continue;
    pair.seats.forEach((seat, i) => {
      if (!seat.participantId || seat.computer || hub.state.pairs[id].pending[i]) return;
      hub.ok(
        {
          type: 'choose',
          participantId: seat.participantId,
          supergame: pair.supergame,
          round: pair.round,
          action,
          clientChoiceId: `${seat.participantId}-${pair.supergame}-${pair.round}`,
        },
        hub.now + 100,
      );
    });
  }
}

/** The first seed whose draws pass `test` (searched, so the test needs no luck). */
function seedWith(delta: number, test: (seed: number) => boolean): number {
  for (let seed = 1; ; seed++) if (test(seed)) return seed;
}

describe('big screen: who may still join', () => {
  it('open: a joiner plays from supergame 1; running: from the next one; none in the last supergame or once it ends', () => {
    const hub = new TestHub(makeDesign({ supergames: 3 }), 5);
    hub.ok({ type: 'open' }, T0);
    joinAll(hub, 4);
    expect(bigScreenView(hub.state).lateEntry).toBe(1);
    hub.ok({ type: 'start' }, hub.now + SEC);
    expect(bigScreenView(hub.state).lateEntry).toBe(2);
    hub.ok({ type: 'pause' }, hub.now + SEC);
    // The engine admits joins while paused, too.
    expect(bigScreenView(hub.state).lateEntry).toBe(2);
    hub.ok({ type: 'resume' }, hub.now + SEC);
    play(hub, rngOf(5), { stopWhen: (h) => h.state.supergame!.number === 3 });
    // A joiner now would only wait in the lobby until the end: the code leaves the screen.
    expect(bigScreenView(hub.state).lateEntry).toBeNull();
    play(hub, rngOf(6));
    expect(hub.state.status).toBe('complete');
    expect(bigScreenView(hub.state).lateEntry).toBeNull();
  });

  it('"end after this supergame" leaves no supergame to enter; a cancelled session none either', () => {
    const { hub } = startSession(4, { supergames: 5 }, 7);
    hub.ok({ type: 'endAfterSupergame' }, hub.now + SEC);
    expect(bigScreenView(hub.state).lateEntry).toBeNull();

    const other = new TestHub(makeDesign(), 8);
    other.ok({ type: 'open' }, T0);
    other.ok({ type: 'cancel' }, T0 + SEC);
    expect(other.state.status).toBe('cancelled');
    expect(bigScreenView(other.state).lateEntry).toBeNull();
  });
});

describe('big screen: the draw', () => {
  it('states the rule: another round while the draw is ≤ 100·δ, or on a finer range when 100·δ is not whole', () => {
    // Source: random termination with a public draw, Roth & Murnighan (1978); Dal Bó & Fréchette (2011).
    expect(bigScreenView(new TestHub(makeDesign({ delta: 0.75 }), 1).state).drawRule).toEqual({ max: 100, cutoff: 75 });
    expect(bigScreenView(new TestHub(makeDesign({ delta: 0.875 }), 1).state).drawRule).toEqual({ max: 1000, cutoff: 875 });
  });

  it('shows a draw only once every pair has seen it, then the last draw of a supergame until the next one has one', () => {
    const delta = 0.75;
    // supergame 1 lasts at least 3 rounds, supergame 2 at least 2
    const seed = seedWith(delta, (s) => supergameDraws(s, delta, 1).length >= 3 && supergameDraws(s, delta, 2).length >= 2);
    const sg1 = supergameDraws(seed, delta, 1);
    const { hub } = startSession(4, { delta, supergames: 3 }, seed);
    const [p1, p2] = hub.state.supergame!.pairIds;
    expect(bigScreenView(hub.state).latestDraw).toBeNull();

    chooseAll(hub, 'C', [p1]);
    // One pair has seen draw 1, the other has not: the room must not see it before them.
    expect(hub.state.pairs[p1].rounds).toHaveLength(1);
    expect(bigScreenView(hub.state).latestDraw).toBeNull();

    chooseAll(hub, 'D', [p2]);
    expect(bigScreenView(hub.state).latestDraw).toEqual({
      supergame: 1,
      fromRound: 1,
      toRound: 1,
      draws: [sg1.draws[0]],
      continues: true,
      sentence: null,
    });
    // Source: common practice — the supergame goes on while draw ≤ 100·δ = 75.
    expect(sg1.draws[0]).toBeLessThanOrEqual(75);

    // The fast pair runs ahead; the screen waits for the slow one.
    chooseAll(hub, 'C', [p1]);
    expect(bigScreenView(hub.state).latestDraw?.toRound).toBe(1);
    chooseAll(hub, 'C', [p2]);
    expect(bigScreenView(hub.state).latestDraw?.toRound).toBe(2);

    // Play supergame 1 out: the next starts at once, and its first round has no draw yet.
    while (hub.state.supergame!.number === 1) chooseAll(hub, 'C');
    const v = bigScreenView(hub.state);
    expect(v.supergame).toBe(2);
    expect(v.cooperationByRound).toEqual([]);
    const last = sg1.draws[sg1.length - 1];
    expect(v.latestDraw).toEqual({
      supergame: 1,
      fromRound: sg1.length,
      toRound: sg1.length,
      draws: [last],
      continues: false,
      sentence: null,
    });
    // Source: common practice — the supergame ends at the first draw above 100·δ.
    expect(last).toBeGreaterThan(75);

    chooseAll(hub, 'C');
    expect(bigScreenView(hub.state).latestDraw).toMatchObject({ supergame: 2, toRound: 1, continues: true });
  });

  it('block termination: the block’s draws together, with the announcement the phones get', () => {
    const delta = 0.75;
    const k = 3;
    const seed = seedWith(delta, (s) => supergameDraws(s, delta, 1, { kind: 'block', k }).length > k);
    const sg1 = supergameDraws(seed, delta, 1, { kind: 'block', k });
    const { hub } = startSession(2, { delta, supergames: 2, termination: { kind: 'block', k } }, seed);
    chooseAll(hub, 'C');
    chooseAll(hub, 'C');
    // Draws of a block are revealed at its end (Fréchette & Yuksel 2017).
    expect(bigScreenView(hub.state).latestDraw).toBeNull();
    chooseAll(hub, 'C');
    const v = bigScreenView(hub.state).latestDraw!;
    expect(v).toMatchObject({ supergame: 1, fromRound: 1, toRound: 3, draws: sg1.draws.slice(0, 3), continues: true });
    expect(v.sentence).toMatch(/^Draws for rounds 1–3: .*so this supergame goes on for another block\.$/);
  });
});

describe('big screen: the closing slide', () => {
  it('cooperation and length of every supergame, and which one "end now" cut short', () => {
    const delta = 0.5;
    const seed = seedWith(delta, (s) => supergameDraws(s, delta, 2).length >= 2);
    const { hub } = startSession(4, { delta, supergames: 3 }, seed);
    // Supergame 1: everyone cooperates. Source: common practice (share of own choices that are C).
    while (hub.state.supergame!.number === 1) chooseAll(hub, 'C');
    chooseAll(hub, 'D');
    hub.ok({ type: 'endNow' }, hub.now + SEC);
    const v = bigScreenView(hub.state);
    expect(v.status).toBe('complete');
    expect(v.bySupergame).toEqual([
      { supergame: 1, length: supergameDraws(seed, delta, 1).length, cooperation: 1, round1Cooperation: 1, truncated: false },
      { supergame: 2, length: supergameDraws(seed, delta, 2).length, cooperation: 0, round1Cooperation: 0, truncated: true },
    ]);
  });
});
