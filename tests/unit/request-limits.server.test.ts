import { describe, expect, it } from 'vitest';
import { ROSTER_LIMITS } from '#app/lib/roster-csv';
import { DATASET_LIMITS } from '#app/models/datasets.server';
import { bodyLimitFor, PAGE_BODY_LIMIT } from '#app/utils/request-limits.server';

describe('bodyLimitFor', () => {
  it('gives pages and sign-in the small limit', () => {
    for (const path of ['/sign-in', '/sign-in/code', '/join/ABC123', '/courses/1/members', '/courses/1/sessions.data', '/api/v1/courses'])
      expect(bodyLimitFor(path, true)).toBe(PAGE_BODY_LIMIT);
  });

  it('gives the upload routes room for their files, signed in only', () => {
    expect(bodyLimitFor('/courses/12/roster', true)).toBeGreaterThan(ROSTER_LIMITS.maxBytes * 3);
    expect(bodyLimitFor('/courses/12/roster.data', true)).toBe(bodyLimitFor('/courses/12/roster', true));
    expect(bodyLimitFor('/courses/12/datasets', true)).toBeGreaterThan(DATASET_LIMITS.maxBytes);
    expect(bodyLimitFor('/courses/12/datasets', true)).toBeLessThan(DATASET_LIMITS.maxBytes * 1.2);
    expect(bodyLimitFor('/courses/12/roster', false)).toBe(PAGE_BODY_LIMIT);
    expect(bodyLimitFor('/courses/12/datasets.data', false)).toBe(PAGE_BODY_LIMIT);
  });

  it('does not stretch a look-alike path', () => {
    for (const path of [
      '/courses/12/roster/x',
      '/courses/x/roster',
      '/courses/12/%72oster',
      '//courses/12/datasets',
      '/courses/12/datasets/3/estimate',
    ])
      expect(bodyLimitFor(path, true)).toBe(PAGE_BODY_LIMIT);
  });

  it('lets long design instructions through the design editor only', () => {
    expect(bodyLimitFor('/courses/3/designs/new', false)).toBe(256 * 1024);
    expect(bodyLimitFor('/courses/3/designs/9.data', false)).toBe(256 * 1024);
    expect(bodyLimitFor('/courses/3/designs', false)).toBe(PAGE_BODY_LIMIT);
  });
});
