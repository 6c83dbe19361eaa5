import { describe, expect, it } from 'vitest';
import { EVENT_LIMITS, EventLimiter, TokenBucket } from '#realtime/rate-limit';

describe('TokenBucket', () => {
  it('allows the burst at once, then the steady rate', () => {
    const b = new TokenBucket({ perSecond: 5, burst: 10 }, 0);
    const first = Array.from({ length: 50 }, () => b.take(0)).filter(Boolean).length;
    expect(first).toBe(10);
    // One second later: five more, not ten.
    const next = Array.from({ length: 50 }, () => b.take(1000)).filter(Boolean).length;
    expect(next).toBe(5);
    // A long pause refills to the burst, never beyond.
    const after = Array.from({ length: 50 }, () => b.take(60_000)).filter(Boolean).length;
    expect(after).toBe(10);
  });
});

describe('EventLimiter', () => {
  it('keeps one bucket per event kind, so a watch flood does not block choices', () => {
    let t = 0;
    const l = new EventLimiter(() => t);
    let watches = 0;
    for (let i = 0; i < 3000; i++) if (l.allow('session:watch')) watches++;
    expect(watches).toBe(EVENT_LIMITS['session:watch'].burst);
    expect(l.allow('choice:submit')).toBe(true);
    t += 1000;
    expect(l.allow('session:watch')).toBe(true);
  });

  it('lets a participant play and retry at a human pace without refusal', () => {
    let t = 0;
    const l = new EventLimiter(() => t);
    // A choice every 2 s with three retries each (a flaky phone), for 100 rounds.
    for (let round = 0; round < 100; round++, t += 2000) for (let k = 0; k < 4; k++) expect(l.allow('choice:submit')).toBe(true);
  });

  it('puts made-up event names in one shared bucket', () => {
    const l = new EventLimiter(() => 0);
    let allowed = 0;
    for (let i = 0; i < 1000; i++) if (l.allow(`x:${i}`)) allowed++;
    expect(allowed).toBe(10);
    expect(l.allow('toString')).toBe(false);
  });
});
