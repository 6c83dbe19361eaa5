import { describe, expect, it } from 'vitest';
import { isStorageError, StorageHealth, StorageUnavailable } from '#realtime/storage-health';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('StorageHealth', () => {
  it('reports the loss once, probes until MariaDB answers (a stall: the probe hangs, then answers), and reports the recovery once', async () => {
    const changes: boolean[] = [];
    let release: () => void = () => undefined;
    let calls = 0;
    const probe = () => {
      calls++;
      // the first probe hangs like a query to a stopped server; it answers when "SIGCONT" comes
      return calls === 1 ? new Promise<void>((r) => (release = r)) : Promise.resolve();
    };
    const h = new StorageHealth(probe, (ok) => changes.push(ok), { everyMs: 10, staleMs: 50 });
    h.trouble();
    h.trouble();
    expect(h.ok).toBe(false);
    await sleep(60);
    expect(calls).toBe(1); // one probe at a time, however long it hangs
    expect(changes).toEqual([false]);
    release();
    await sleep(30);
    expect(h.ok).toBe(true);
    expect(changes).toEqual([false, true]);
    h.close();
  });

  it('a refused probe is retried; fresh() is false once nothing answered within the bound', async () => {
    let up = false;
    const changes: boolean[] = [];
    const h = new StorageHealth(
      () => (up ? Promise.resolve() : Promise.reject(Object.assign(new Error('refused'), { code: 'ECONNREFUSED' }))),
      (ok) => changes.push(ok),
      {
        everyMs: 10,
        staleMs: 40,
      },
    );
    expect(h.fresh()).toBe(true);
    await sleep(60);
    expect(h.fresh()).toBe(false); // silent too long: treated as lost, probing starts
    await sleep(40);
    expect(h.ok).toBe(false);
    up = true;
    for (let i = 0; i < 50 && !h.ok; i++) await sleep(5);
    expect(h.ok).toBe(true);
    expect(h.fresh()).toBe(true); // the probe that answered counts as an answer
    expect(changes).toEqual([false, true]);
    h.close();
  });
});

describe('isStorageError', () => {
  it('knows a lost connection, also wrapped, and not a bad query', () => {
    expect(isStorageError(Object.assign(new Error('x'), { code: 'PROTOCOL_CONNECTION_LOST', fatal: true }))).toBe(true);
    expect(isStorageError(new Error('Failed query', { cause: Object.assign(new Error('refused'), { code: 'ECONNREFUSED' }) }))).toBe(true);
    expect(isStorageError(new StorageUnavailable())).toBe(true);
    expect(isStorageError(Object.assign(new Error('dup'), { code: 'ER_DUP_ENTRY', fatal: false }))).toBe(false);
    expect(isStorageError(new Error('plain'))).toBe(false);
  });
});
