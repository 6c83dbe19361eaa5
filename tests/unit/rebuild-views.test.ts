// A rebuild replays stored rows through the engine; the views it would build are thrown away, so
// it must build none (a 1,000-phone session is rebuilt on every restart).
import { describe, expect, it, vi } from 'vitest';
import { rebuild } from '#realtime/engine/rebuild';
import { TestHub, joinAll, makeDesign, play, rngOf } from './harness';

const calls = vi.hoisted(() => ({ participant: 0, floor: 0, bigScreen: 0 }));
vi.mock('#realtime/engine/views', async (importOriginal) => {
  const real = await importOriginal<typeof import('#realtime/engine/views')>();
  return {
    ...real,
    participantView: (...a: Parameters<typeof real.participantView>) => (calls.participant++, real.participantView(...a)),
    floorView: (...a: Parameters<typeof real.floorView>) => (calls.floor++, real.floorView(...a)),
    bigScreenView: (...a: Parameters<typeof real.bigScreenView>) => (calls.bigScreen++, real.bigScreenView(...a)),
  };
});

describe('rebuild', () => {
  it('builds no views while it replays', () => {
    const hub = new TestHub(makeDesign({ supergames: 2 }), 'no-views');
    hub.ok({ type: 'open' });
    joinAll(hub, 30);
    hub.ok({ type: 'start' }, hub.now + 1000);
    play(hub, rngOf(11), { stopWhen: (h) => h.choices.length >= 120 });
    // the live hub (TestHub steps with views) did build them: the counter works
    expect(calls.participant).toBeGreaterThan(0);
    calls.participant = calls.floor = calls.bigScreen = 0;
    const state = rebuild(hub.design, hub.seed, hub.participants, hub.choices, hub.log, { sessionId: hub.sessionId });
    expect(state.seq).toBe(hub.state.seq);
    expect(calls).toEqual({ participant: 0, floor: 0, bigScreen: 0 });
  });
});
