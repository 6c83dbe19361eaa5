// Views never go back in time on a client: each carries the state's sequence number, and a
// client drops a view of the same session older than the one it shows (in a cluster, the views
// of a session that just changed owner can arrive out of order; an older one would put a phone
// back on a round it has answered, and it would wait for ever).
import { describe, expect, it } from 'vitest';
import { bigScreenView, floorView, participantView } from '#realtime/engine/views';
import { supersedes } from '#realtime/protocol';
import { TestHub, joinAll, makeDesign, play, rngOf } from './harness';

describe('view order', () => {
  it('every view carries the state’s sequence number, which only grows as the session is played', () => {
    const hub = new TestHub(makeDesign({ supergames: 2 }), 'view-order');
    hub.ok({ type: 'open' });
    joinAll(hub, 4);
    hub.ok({ type: 'start' }, hub.now + 1000);
    const p = hub.state.joinOrder[0];
    const before = participantView(hub.state, p);
    expect(before.seq).toBe(hub.state.seq);
    expect(floorView(hub.state, hub.now).seq).toBe(hub.state.seq);
    expect(bigScreenView(hub.state).seq).toBe(hub.state.seq);
    play(hub, rngOf(3), { stopWhen: (h) => h.choices.length >= 8 });
    const after = participantView(hub.state, p);
    expect(after.seq).toBeGreaterThan(before.seq);
    // the phone shows `after`; `before` arriving late is dropped, a newer or equal one is taken
    expect(supersedes(before, after)).toBe(false);
    expect(supersedes(after, before)).toBe(true);
    expect(supersedes(after, after)).toBe(true);
    expect(supersedes(before, null)).toBe(true);
    // another session's view is never compared by number
    expect(supersedes({ sessionId: 'other', seq: 1 }, after)).toBe(true);
  });
});
