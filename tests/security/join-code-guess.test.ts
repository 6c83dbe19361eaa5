// The public /join page checks a code before sign-in (issue 12), so it must not become a way to
// walk the 6-character code space: codes matching no open session are limited per network.
import { afterAll, expect, it } from 'vitest';
import { closeTestDb, createCourse, createUser } from '#tests/helpers/db';
import { signIn, uniqueEmail } from '#tests/helpers/http';
import { createDesign, openSession } from '#tests/helpers/live';
import { ClientFrom } from './helpers';

afterAll(async () => {
  await closeTestDb();
});

/** The default JOIN_CODE_MISSES_PER_IP: high enough for a lecture hall behind one address that mistypes. */
const LIMIT = 300;

it(
  'refuses join codes from a network after 300 that matched nothing, right ones too, and says when to retry',
  { timeout: 120_000 },
  async () => {
    const email = uniqueEmail('guess-inst');
    const id = await createUser(email);
    const courseId = await createCourse('Guessing', [{ userId: id, role: 'instructor' }]);
    const { code } = await openSession(await signIn(email), courseId, await createDesign(courseId, id));

    const guesser = new ClientFrom('127.0.0.77');
    const alphabet = 'ABCDEFGHJKLMNPQRSTUVWXYZ23456789';
    let tried = 0;
    for (let i = 0; tried < LIMIT; i++) {
      const guess = Array.from({ length: 6 }, (_, k) => alphabet[(i * 7 + k * 13 + i * k) % alphabet.length]).join('');
      if (guess === code) continue;
      const res = await guesser.post('/join', { code: guess });
      expect(res.status).toBe(404);
      tried++;
    }
    // Before the fix every code, right or wrong, was a 302: no answer, no limit.
    const blocked = await guesser.post('/join', { code });
    expect(blocked.status).toBe(429);
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(await blocked.text()).toContain('Too many codes that match no session');

    // Another network (another student's phone on mobile data) is not affected.
    const other = await new ClientFrom('127.0.0.78').post('/join', { code });
    expect(other.status).toBe(302);
  },
);
