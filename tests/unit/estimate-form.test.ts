// The Debrief's estimation form → request (app/utils/estimate-form.ts): windows in the CLI's
// syntax, presets, limits, and one canonical request for requests that mean the same.
import { describe, expect, it } from 'vitest';
import { parseWindow } from '#app/lib/panel';
import { canonicalRequest, estimateRequestFromForm } from '#app/utils/estimate-form';

const form = (fields: Record<string, string | string[]>) => {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) for (const x of Array.isArray(v) ? v : [v]) f.append(k, x);
  return f;
};
const base = { sessions: '4,2', windowKind: 'all', preset: 'dbf2011', bootstrap: '200', seed: '9' };

describe('estimateRequestFromForm', () => {
  it('the DBF 2011 preset on two sessions, all supergames', () => {
    expect(estimateRequestFromForm(form(base))).toEqual({
      ok: true,
      request: {
        source: { kind: 'sessions', sessionIds: [2, 4] },
        window: 'all',
        include: 'own',
        strategies: ['ALLD', 'ALLC', 'Grim', 'TFT', 'WSLS', 'T2'],
        bootstrap: 200,
        seed: 9,
      },
    });
  });

  it('the Debrief’s switch travels in the request: every origin is another request than own choices', () => {
    const all = estimateRequestFromForm(form({ ...base, include: 'all' }));
    const own = estimateRequestFromForm(form(base));
    if (!all.ok || !own.ok) throw new Error('refused');
    expect([all.request.include, own.request.include]).toEqual(['all', 'own']);
    expect(canonicalRequest(all.request)).not.toEqual(canonicalRequest(own.request));
    expect(estimateRequestFromForm(form({ ...base, include: 'some' }))).toEqual({
      ok: false,
      errors: { include: 'Choose which choices to use' },
    });
  });

  it('each window kind becomes the syntax parseWindow reads', () => {
    const cases: [Record<string, string>, string][] = [
      [{ windowKind: 'supergames', from: '3', to: '8' }, 'supergames:3-8'],
      [{ windowKind: 'last', last: '5' }, 'last:5'],
      [{ windowKind: 'after-rounds', afterRounds: '110' }, 'after-rounds:110'],
    ];
    for (const [fields, text] of cases) {
      const r = estimateRequestFromForm(form({ ...base, ...fields }));
      if (!r.ok) throw new Error(JSON.stringify(r.errors));
      expect(r.request.window).toBe(text);
      expect(() => parseWindow(r.request.window)).not.toThrow();
    }
  });

  it('library strategies of the user’s choice, in a fixed order; a dataset instead of sessions', () => {
    const r = estimateRequestFromForm(form({ ...base, sessions: '', dataset: '12', preset: 'custom', strategy: ['STFT', 'TFT', 'ALLD'] }));
    expect(r).toEqual({
      ok: true,
      request: { source: { kind: 'dataset', datasetId: 12 }, window: 'all', strategies: ['ALLD', 'TFT', 'STFT'], bootstrap: 200, seed: 9 },
    });
  });

  it('errors by field, nothing else', () => {
    expect(estimateRequestFromForm(form({ ...base, bootstrap: '-1', seed: 'x' }))).toEqual({
      ok: false,
      errors: { bootstrap: 'B cannot be negative', seed: 'The seed must be a whole number' },
    });
    expect(estimateRequestFromForm(form({ ...base, windowKind: 'last', last: '0' }))).toEqual({
      ok: false,
      errors: { last: 'The number of supergames must be at least 1' },
    });
    expect(estimateRequestFromForm(form({ ...base, preset: 'custom', strategy: ['TFT', 'Nope'] }))).toEqual({
      ok: false,
      errors: { strategy: 'Choose strategies from the library' },
    });
    expect(estimateRequestFromForm(form({ ...base, sessions: 'a,b' }))).toEqual({
      ok: false,
      errors: { form: 'Choose sessions of this course or a dataset' },
    });
  });

  it('same sessions in another order or repeated, same strategies in another order: one canonical request', () => {
    const a = canonicalRequest({
      source: { kind: 'sessions', sessionIds: [4, 2, 4] },
      window: 'all',
      strategies: ['TFT', 'ALLD'],
      bootstrap: 10,
      seed: 1,
    });
    const b = canonicalRequest({
      source: { kind: 'sessions', sessionIds: [2, 4] },
      window: 'all',
      strategies: ['ALLD', 'TFT'],
      bootstrap: 10,
      seed: 1,
    });
    expect(JSON.stringify(a)).toBe(JSON.stringify(b));
  });
});
