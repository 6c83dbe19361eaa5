// Who is signed in: a signed cookie that carries only a random token, and a row per sign-in in
// MariaDB (auth_sessions), so signing out (here or everywhere) really ends it. The e-mailed codes
// that lead here live in sign-in.server.ts.
// Word clash: the *sign-in session* (a cookie) is not an experiment *session*; code here says
// "auth session" for the former.
import { createHash, randomBytes } from 'node:crypto';
import { and, desc, eq, gt, lt } from 'drizzle-orm';
import { createCookieSessionStorage, redirect } from 'react-router';
import { authEvents, authSessions, users } from '#drizzle/schema';
import { db } from './db.server';
import { env } from './env.server';
import { respondUnless } from './http.server';
import { remember } from './remember.server';
import { sockets } from './sockets.server';

const AUTH_DAYS = 30;
/** last_seen_at is written at most this often per sign-in (one UPDATE, not one per request) */
const SEEN_EVERY_MS = 5 * 60_000;

export interface AuthCookieData {
  /** the random token whose SHA-256 names the auth_sessions row */
  token: string;
  /** where to go after signing in (kept while the code is on its way) */
  redirectTo: string;
}

function makeStorage() {
  return createCookieSessionStorage<AuthCookieData>({
    cookie: {
      name: '__parley_auth',
      httpOnly: true,
      sameSite: 'lax',
      path: '/',
      secure: env().APP_URL.startsWith('https://'),
      secrets: [env().SESSION_SECRET],
      maxAge: 60 * 60 * 24 * AUTH_DAYS,
    },
  });
}

export function authSessionStorage() {
  return remember('auth-cookie-storage', makeStorage);
}

export async function getAuthSession(request: Request) {
  return authSessionStorage().getSession(request.headers.get('Cookie'));
}

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

export interface SignedIn {
  userId: number;
  /** the auth_sessions id (a hash, safe to use as a socket room name) */
  authKey: string;
}

/**
 * The sign-in behind a raw Cookie header, if the server still holds it (pages and the socket hub's
 * handshake alike). A valid signature is not enough: the row must exist and not have expired.
 */
export async function signedInFromCookie(cookieHeader: string | null | undefined): Promise<SignedIn | null> {
  return signedInFromSession(await authSessionStorage().getSession(cookieHeader ?? null));
}

/** The same, for an auth session cookie already read (signOut reads it once for both uses). */
async function signedInFromSession(s: Awaited<ReturnType<typeof getAuthSession>>): Promise<SignedIn | null> {
  const token = s.get('token');
  if (typeof token !== 'string' || token.length < 32) return null;
  const authKey = sha256(token);
  const [row] = await db()
    .select({ userId: authSessions.userId, lastSeenAt: authSessions.lastSeenAt })
    .from(authSessions)
    .where(and(eq(authSessions.id, authKey), gt(authSessions.expiresAt, new Date())));
  if (!row) return null;
  if (Date.now() - row.lastSeenAt.getTime() > SEEN_EVERY_MS) {
    await db().update(authSessions).set({ lastSeenAt: new Date() }).where(eq(authSessions.id, authKey));
  }
  return { userId: row.userId, authKey };
}

export interface CurrentUser {
  id: number;
  email: string;
  name: string | null;
  isAdmin: boolean;
}

export function isAdminEmail(email: string) {
  return env().ADMIN_EMAILS.includes(email.toLowerCase());
}

export async function getUser(request: Request): Promise<CurrentUser | null> {
  const signedIn = await signedInFromCookie(request.headers.get('Cookie'));
  if (!signedIn) return null;
  const [u] = await db().select({ id: users.id, email: users.email, name: users.name }).from(users).where(eq(users.id, signedIn.userId));
  return u ? { ...u, isAdmin: isAdminEmail(u.email) } : null;
}

/**
 * A path on this site to return to after sign-in, or the fallback. The target is resolved the way a
 * browser resolves it (the URL parser drops tabs and newlines, reads `\` as `/`), and only a result
 * on our own origin whose path cannot be read as another host is kept.
 */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback = '/') {
  if (typeof to !== 'string' || !to.startsWith('/')) return fallback;
  const base = new URL(env().APP_URL);
  let url: URL;
  try {
    url = new URL(to, base);
  } catch {
    return fallback;
  }
  if (url.origin !== base.origin) return fallback;
  const path = url.pathname + url.search + url.hash;
  // "/.//evil.example" resolves to the path "//evil.example": same origin here, another host in a
  // Location header.
  if (!path.startsWith('/') || path.startsWith('//') || path.startsWith('/\\')) return fallback;
  return path;
}

export async function requireUser(request: Request): Promise<CurrentUser> {
  const user = await getUser(request);
  if (!user) {
    const url = new URL(request.url);
    throw redirect(`/sign-in?redirectTo=${encodeURIComponent(url.pathname + url.search)}`);
  }
  return user;
}

export async function requireAdmin(request: Request) {
  const user = await requireUser(request);
  respondUnless(user.isAdmin, 403, 'Only site administrators open this page.');
  return user;
}

export async function recordAuthEvent(kind: 'code-failure' | 'sign-in', email: string, ip: string) {
  await db().insert(authEvents).values({ kind, email: email.toLowerCase(), ip });
}

/**
 * Starts a sign-in for a verified e-mail: the user (created if new), a server-side row, the cookie.
 * `ip` is the load context's clientIp.
 */
export async function signInAs(request: Request, email: string, ip: string) {
  const normalised = email.trim().toLowerCase();
  await db()
    .insert(users)
    .values({ email: normalised })
    .onDuplicateKeyUpdate({ set: { lastSignInAt: new Date() } });
  const [u] = await db().select({ id: users.id }).from(users).where(eq(users.email, normalised));
  const token = randomBytes(32).toString('base64url');
  const now = new Date();
  await db()
    .insert(authSessions)
    .values({
      id: sha256(token),
      userId: u.id,
      lastSeenAt: now,
      expiresAt: new Date(now.getTime() + AUTH_DAYS * 24 * 3600_000),
      ip,
      userAgent: (request.headers.get('user-agent') ?? '').slice(0, 255) || null,
    });
  const session = await getAuthSession(request);
  const to = safeRedirect(session.get('redirectTo'));
  session.unset('redirectTo');
  session.set('token', token);
  await recordAuthEvent('sign-in', normalised, ip);
  return { to, cookie: await authSessionStorage().commitSession(session) };
}

/**
 * Ends this sign-in (or, `everywhere`, every sign-in of its user) on the server, closes the sockets
 * that came in with it, and returns the Set-Cookie that clears the browser's copy.
 */
export async function signOut(request: Request, { everywhere = false } = {}) {
  const session = await getAuthSession(request);
  const signedIn = await signedInFromSession(session);
  if (signedIn) {
    if (everywhere) {
      await db().delete(authSessions).where(eq(authSessions.userId, signedIn.userId));
      sockets().dropUser(signedIn.userId);
    } else {
      await db().delete(authSessions).where(eq(authSessions.id, signedIn.authKey));
      sockets().dropAuthSession(signedIn.authKey);
    }
  }
  return authSessionStorage().destroySession(session);
}

/** Forgets expired sign-ins (a periodic job: app/jobs/all.server.ts). */
export async function pruneAuthSessions() {
  await db().delete(authSessions).where(lt(authSessions.expiresAt, new Date()));
}

/** Forgets sign-in events older than a day (a periodic job: app/jobs/all.server.ts). */
export async function pruneAuthEvents() {
  await db()
    .delete(authEvents)
    .where(lt(authEvents.createdAt, new Date(Date.now() - 24 * 3600_000)));
}

/** The account's sign-ins still held by the server, newest first (the account page lists them). */
export async function listSignIns(userId: number) {
  return db()
    .select({
      id: authSessions.id,
      createdAt: authSessions.createdAt,
      lastSeenAt: authSessions.lastSeenAt,
      ip: authSessions.ip,
      userAgent: authSessions.userAgent,
    })
    .from(authSessions)
    .where(and(eq(authSessions.userId, userId), gt(authSessions.expiresAt, new Date())))
    .orderBy(desc(authSessions.lastSeenAt));
}
