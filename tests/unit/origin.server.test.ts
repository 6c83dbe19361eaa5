import { describe, expect, it } from 'vitest';
import { requestOrigin } from '#app/utils/origin.server';

const APP = 'https://parley.example.edu';

describe('requestOrigin', () => {
  it('accepts only our exact origin', () => {
    expect(requestOrigin(APP, { origin: APP })).toBe('same');
    expect(requestOrigin(APP, { origin: `${APP}/` })).toBe('same');
    for (const origin of [
      'http://parley.example.edu',
      'https://parley.example.edu:8443',
      'https://evil.parley.example.edu',
      'https://parley.example.edu.evil.test',
      'null',
      '',
      'not a url',
    ])
      expect(requestOrigin(APP, { origin })).toBe('foreign');
  });

  it('reads the Referer only when Origin is absent', () => {
    expect(requestOrigin(APP, { referer: `${APP}/courses/1?x=1` })).toBe('same');
    expect(requestOrigin(APP, { referer: 'https://other.example.edu/page' })).toBe('foreign');
    expect(requestOrigin(APP, { origin: 'https://other.example.edu', referer: `${APP}/` })).toBe('foreign');
    expect(requestOrigin(APP, {})).toBe('absent');
  });
});
