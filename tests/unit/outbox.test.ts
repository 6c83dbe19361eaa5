// The phone's outbox (issue 12, bug 1): which answers keep a choice for another send, the
// back-off between sends, and the copy kept in sessionStorage across a reload.
import { describe, expect, it } from 'vitest';
import { backoffMs, loadOutbox, newChoiceId, type OutboxEntry, outcomeOf, saveOutbox } from '#app/components/live/outbox';
import type { StoredChoice } from '#realtime/engine/types';
import type { Ack, AckErrorCode } from '#realtime/protocol';

/** sessionStorage as the browser has it, in memory. */
class MemoryStorage implements Storage {
  private items = new Map<string, string>();
  get length() {
    return this.items.size;
  }
  clear() {
    this.items.clear();
  }
  getItem(k: string) {
    return this.items.get(k) ?? null;
  }
  key(i: number) {
    return [...this.items.keys()][i] ?? null;
  }
  removeItem(k: string) {
    this.items.delete(k);
  }
  setItem(k: string, v: string) {
    this.items.set(k, v);
  }
}

const refused = (code: AckErrorCode): Ack<StoredChoice> => ({ ok: false, code, message: code });
const entry: OutboxEntry = { sessionId: 7, supergame: 2, round: 3, action: 'D', clientChoiceId: 'abc-12345678' };

describe('the outbox', () => {
  it('keeps a choice for another send while the outcome is open or the server cannot take it now', () => {
    // 'unavailable': the database stalled, the row may exist; a resend with the same id is safe.
    for (const code of ['unavailable', 'server-error', 'rate-limited', 'forbidden', 'session-not-running'] as const)
      expect(outcomeOf(refused(code))).toBe('retry');
  });

  it('drops it on a definitive answer, and says which', () => {
    expect(outcomeOf({ ok: true, data: {} as StoredChoice })).toBe('stored');
    expect(outcomeOf(refused('round-closed'))).toBe('closed');
    expect(outcomeOf(refused('already-chosen'))).toBe('taken');
    for (const code of ['bad-payload', 'not-found', 'not-a-participant', 'handed-to-computer', 'not-your-pair'] as const)
      expect(outcomeOf(refused(code))).toBe('refused');
  });

  it('waits 1, 2, 4, 8 s between sends, then 8 s, stretched by up to half at random', () => {
    expect([0, 1, 2, 3, 4, 9].map((n) => backoffMs(n, () => 0))).toEqual([1000, 2000, 4000, 8000, 8000, 8000]);
    expect(backoffMs(0, () => 0.999)).toBe(1500);
    expect(backoffMs(3, () => 0.5)).toBe(10_000);
  });

  it('keeps the choice in sessionStorage across a reload, per session, and forgets it when told', () => {
    const storage = new MemoryStorage();
    saveOutbox(7, entry, storage);
    expect(loadOutbox(7, storage)).toEqual(entry);
    expect(loadOutbox(8, storage)).toBeNull();
    saveOutbox(7, null, storage);
    expect(loadOutbox(7, storage)).toBeNull();
  });

  it('ignores a stored copy that is not a choice, and works without storage', () => {
    const storage = new MemoryStorage();
    storage.setItem('parley:outbox:7', '{not json');
    expect(loadOutbox(7, storage)).toBeNull();
    storage.setItem('parley:outbox:7', JSON.stringify({ ...entry, action: 'X' }));
    expect(loadOutbox(7, storage)).toBeNull();
    storage.setItem('parley:outbox:7', JSON.stringify({ ...entry, sessionId: 8 }));
    expect(loadOutbox(7, storage)).toBeNull();
    expect(() => saveOutbox(7, entry, undefined)).not.toThrow();
    expect(loadOutbox(7, undefined)).toBeNull();
  });

  it('makes client choice ids the server accepts (8 to 64 characters), a new one each time', () => {
    const a = newChoiceId();
    expect(a.length).toBeGreaterThanOrEqual(8);
    expect(a.length).toBeLessThanOrEqual(64);
    expect(newChoiceId()).not.toBe(a);
  });
});
