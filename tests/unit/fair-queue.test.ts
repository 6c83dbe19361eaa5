import { describe, expect, it } from 'vitest';
import { FairQueue } from '#app/lib/fair-queue';

const drain = <K, J>(q: FairQueue<K, J>) => {
  const out: J[] = [];
  for (let j = q.shift(); j !== undefined; j = q.shift()) out.push(j);
  return out;
};

describe('FairQueue (round robin between courses)', () => {
  it('a second course’s job does not wait behind all of the first course’s', () => {
    const q = new FairQueue<number, string>();
    for (let i = 1; i <= 5; i++) q.push(1, `A${i}`);
    q.push(2, 'B1');
    expect(q.size).toBe(6);
    expect(drain(q)).toEqual(['A1', 'B1', 'A2', 'A3', 'A4', 'A5']);
    expect(q.size).toBe(0);
  });

  it('alternates between courses with waiting jobs, each in its own arrival order', () => {
    const q = new FairQueue<string, string>();
    for (const job of ['A1', 'A2', 'A3', 'B1', 'B2', 'C1']) q.push(job[0], job);
    expect(drain(q)).toEqual(['A1', 'B1', 'C1', 'A2', 'B2', 'A3']);
  });

  it('a course that arrives while another runs goes next (least recently served first)', () => {
    const q = new FairQueue<string, string>();
    q.push('A', 'A1');
    expect(q.shift()).toBe('A1'); // A1 runs
    q.push('A', 'A2');
    q.push('A', 'A3');
    q.push('B', 'B1');
    expect(q.shift()).toBe('B1');
    q.push('B', 'B2'); // arrives while B1 runs: A was served longer ago
    expect(drain(q)).toEqual(['A2', 'B2', 'A3']);
  });

  it('remembers when a course was served after its jobs ran out', () => {
    const q = new FairQueue<string, string>();
    q.push('A', 'A1');
    q.push('B', 'B1');
    expect(q.shift()).toBe('A1');
    q.push('A', 'A2'); // A was just served; B waits longer
    expect(drain(q)).toEqual(['B1', 'A2']);
  });

  it('is empty when nothing waits', () => {
    const q = new FairQueue<number, number>();
    expect(q.shift()).toBeUndefined();
    expect(q.size).toBe(0);
  });
});
