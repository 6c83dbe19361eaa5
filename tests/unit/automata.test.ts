import { describe, expect, it } from 'vitest';
import { type Action, LIBRARY, libraryStrategy, prescribedActions } from '#app/lib/automata';

const acts = (s: string) => s.split('') as Action[];
const matches = (id: string, own: string, partner: string) =>
  prescribedActions(libraryStrategy(id), acts(own), acts(partner)).filter((a, i) => a === own[i]).length;

describe('library automata follow the observed actions', () => {
  it('reproduces the match counts of the SFEM toy example', () => {
    // Source: methods.md §5 toy check [calc]: own C,C,D; partner C,D,D.
    expect(matches('ALLD', 'CCD', 'CDD')).toBe(1);
    expect(matches('ALLC', 'CCD', 'CDD')).toBe(2);
    expect(matches('Grim', 'CCD', 'CDD')).toBe(3);
    expect(matches('TFT', 'CCD', 'CDD')).toBe(3);
    expect(matches('WSLS', 'CCD', 'CDD')).toBe(3);
    expect(matches('T2', 'CCD', 'CDD')).toBe(3);
    expect(matches('STFT', 'CCD', 'CDD')).toBe(2);
  });

  it('T2 punishes for two rounds, then forgives', () => {
    // Source: Dal Bó & Fréchette (2011), definition of T2 (methods.md §3).
    expect(prescribedActions(libraryStrategy('T2'), acts('CDDCC'), acts('DCCCC'))).toEqual(acts('CDDCC'));
  });

  it('every library transition points at an existing state', () => {
    for (const a of LIBRARY) {
      for (const s of a.states) for (const next of Object.values(s.next)) expect(next).toBeLessThan(a.states.length);
    }
  });
});
