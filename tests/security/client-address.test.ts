// The client's address (rate limits per network, sign-in records) is the socket's peer: server.ts
// puts it in React Router's load context, so no request header can set it. Before, server.ts
// wrote it into a request header of its own making for the app to read back.
import { and, desc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { authEvents, authSessions, signInCodes, users } from '#drizzle/schema';
import { closeTestDb, testDb } from '#tests/helpers/db';
import { isSignedIn, uniqueEmail } from '#tests/helpers/http';
import { ClientFrom, requestCode } from './helpers';

afterAll(closeTestDb);

const FORGED = '203.0.113.77';

describe('the client address cannot be forged with a header', () => {
  it('records the socket address for the code, the sign-in and its event, whatever headers say', async () => {
    const email = uniqueEmail('forger');
    const c = new ClientFrom('127.0.0.9', {
      'x-parley-client-ip': FORGED,
      'x-forwarded-for': FORGED,
      'x-real-ip': FORGED,
    });
    const { code } = await requestCode(c, email);
    const res = await c.post('/sign-in/code', { intent: 'verify', code });
    expect(res.status).toBe(302);
    expect(await isSignedIn(c)).toBe(true);

    const db = testDb();
    const [codeRow] = await db.select({ ip: signInCodes.ip }).from(signInCodes).where(eq(signInCodes.email, email));
    expect(codeRow.ip).toBe('127.0.0.9');
    const [user] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
    const sessions = await db.select({ ip: authSessions.ip }).from(authSessions).where(eq(authSessions.userId, user.id));
    expect(sessions.map((s) => s.ip)).toEqual(['127.0.0.9']);
    const [event] = await db
      .select({ ip: authEvents.ip })
      .from(authEvents)
      .where(and(eq(authEvents.email, email), eq(authEvents.kind, 'sign-in')))
      .orderBy(desc(authEvents.id));
    expect(event.ip).toBe('127.0.0.9');
  });
});
