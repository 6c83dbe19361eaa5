// Sign-in: e-mailed one-time codes (remix-auth-totp) and a signed cookie.
// Word clash: the *sign-in session* (a cookie) is not an experiment *session*; code here says
// "auth session" for the former.
import { and, count, eq, gt, lt, min } from 'drizzle-orm';
import { createCookieSessionStorage, redirect } from 'react-router';
import { Authenticator } from 'remix-auth';
import { TOTPStrategy } from 'remix-auth-totp';
import { authEvents, users } from '#drizzle/schema';
import { db } from './db.server';
import { env } from './env.server';
import { sendMail, signInCodeMail } from './mail.server';

export const CODE_MINUTES = 10;
const WINDOW_MINUTES = 15;

export interface AuthSessionData {
  userId: number;
  redirectTo: string;
}

const g = globalThis as unknown as {
  __parleyAuthStorage?: ReturnType<typeof makeStorage>;
  __parleyAuthenticator?: Authenticator<number>;
};

function makeStorage() {
  return createCookieSessionStorage<AuthSessionData>({
    cookie: {
      name: '__parley_auth',
      httpOnly: true,
      sameSite: 'lax',
      path: '/',
      secure: env().APP_URL.startsWith('https://'),
      secrets: [env().SESSION_SECRET],
      maxAge: 60 * 60 * 24 * 30,
    },
  });
}

export function authSessionStorage() {
  g.__parleyAuthStorage ??= makeStorage();
  return g.__parleyAuthStorage;
}

export async function getAuthSession(request: Request) {
  return authSessionStorage().getSession(request.headers.get('Cookie'));
}

/** Reads the user id from a raw Cookie header (also used by the socket hub's handshake). */
export async function userIdFromCookie(cookieHeader: string | null | undefined): Promise<number | null> {
  const s = await authSessionStorage().getSession(cookieHeader ?? null);
  const id = s.get('userId');
  return typeof id === 'number' ? id : null;
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
  const id = await userIdFromCookie(request.headers.get('Cookie'));
  if (id === null) return null;
  const [u] = await db().select({ id: users.id, email: users.email, name: users.name }).from(users).where(eq(users.id, id));
  return u ? { ...u, isAdmin: isAdminEmail(u.email) } : null;
}

/** Safe in-app path to return to after sign-in: never another host. */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback = '/') {
  if (typeof to !== 'string' || !to.startsWith('/') || to.startsWith('//') || to.startsWith('/\\')) return fallback;
  return to;
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
  if (!user.isAdmin) throw new Response('Only site administrators open this page.', { status: 403 });
  return user;
}

export function clientIp(request: Request) {
  // server.ts sets this header from the socket (or X-Forwarded-For behind a trusted proxy) and
  // overwrites whatever a client sent.
  return request.headers.get('x-parley-client-ip') ?? 'unknown';
}

export async function recordAuthEvent(kind: 'code-request' | 'code-failure' | 'sign-in', email: string, ip: string) {
  await db().insert(authEvents).values({ kind, email: email.toLowerCase(), ip });
}

async function countSince(kind: 'code-request' | 'code-failure', column: 'email' | 'ip', value: string, since: Date) {
  const col = column === 'email' ? authEvents.email : authEvents.ip;
  const [row] = await db()
    .select({ n: count(), oldest: min(authEvents.createdAt) })
    .from(authEvents)
    .where(and(eq(authEvents.kind, kind), eq(col, value), gt(authEvents.createdAt, since)));
  return { n: row?.n ?? 0, oldest: row?.oldest ?? null };
}

export interface Limited {
  limited: true;
  retryAfterSeconds: number;
  reason: string;
}

/** Rate limits on code requests (per e-mail and per address) and on wrong codes (per e-mail). */
export async function checkSignInLimits(
  kind: 'code-request' | 'code-failure',
  email: string | null,
  ip: string,
): Promise<Limited | null> {
  const e = env();
  const since = new Date(Date.now() - WINDOW_MINUTES * 60_000);
  const checks: { column: 'email' | 'ip'; value: string; max: number; reason: string }[] = [];
  if (kind === 'code-request') {
    if (email) checks.push({ column: 'email', value: email.toLowerCase(), max: e.CODE_REQUESTS_PER_EMAIL, reason: 'Too many codes were requested for this e-mail address.' });
    checks.push({ column: 'ip', value: ip, max: e.CODE_REQUESTS_PER_IP, reason: 'Too many codes were requested from this network.' });
  } else if (email) {
    checks.push({ column: 'email', value: email.toLowerCase(), max: e.CODE_FAILURES_PER_EMAIL, reason: 'Too many wrong codes were entered for this e-mail address.' });
  }
  for (const c of checks) {
    const { n, oldest } = await countSince(kind, c.column, c.value, since);
    if (n >= c.max) {
      const freeAt = (oldest ?? new Date()).getTime() + WINDOW_MINUTES * 60_000;
      return { limited: true, reason: c.reason, retryAfterSeconds: Math.max(1, Math.ceil((freeAt - Date.now()) / 1000)) };
    }
  }
  return null;
}

export async function pruneAuthEvents() {
  await db()
    .delete(authEvents)
    .where(lt(authEvents.createdAt, new Date(Date.now() - 24 * 3600_000)));
}

/** Finds or creates the user for a verified e-mail and returns the auth session cookie. */
export async function signInAs(request: Request, email: string) {
  const normalised = email.trim().toLowerCase();
  await db().insert(users).values({ email: normalised }).onDuplicateKeyUpdate({ set: { lastSignInAt: new Date() } });
  const [u] = await db().select({ id: users.id }).from(users).where(eq(users.email, normalised));
  const session = await getAuthSession(request);
  const to = safeRedirect(session.get('redirectTo'));
  session.unset('redirectTo');
  session.set('userId', u.id);
  await recordAuthEvent('sign-in', normalised, clientIp(request));
  return { to, cookie: await authSessionStorage().commitSession(session) };
}

export function authenticator() {
  if (g.__parleyAuthenticator) return g.__parleyAuthenticator;
  const a = new Authenticator<number>();
  const e = env();
  a.use(
    new TOTPStrategy(
      {
        secret: e.TOTP_SECRET,
        emailSentRedirect: '/sign-in/code',
        magicLinkPath: '/sign-in/link',
        successRedirect: '/',
        failureRedirect: '/sign-in/code',
        // Digits only: phones then show the number pad.
        totpGeneration: { digits: 6, charSet: '0123456789', period: CODE_MINUTES * 60, maxAttempts: 5 },
        cookieOptions: { maxAge: CODE_MINUTES * 60, path: '/', ...(e.APP_URL.startsWith('https://') ? { secure: true as const } : {}) },
        customErrors: {
          invalidTotp: 'That code is not right. Check the latest e-mail and try again.',
          expiredTotp: 'That code has expired. Ask for a new one.',
          rateLimitExceeded: 'Too many wrong codes. Ask for a new code.',
          missingSessionEmail: 'Start again: enter your e-mail address to get a code.',
          missingSessionTotp: 'That code is no longer valid. Ask for a new one.',
        },
        sendTOTP: async ({ email, code, magicLink }) => {
          // Links in the e-mail must point at the public address, not the one the request came in on.
          const link = new URL(magicLink);
          const publicLink = new URL(link.pathname + link.search, e.APP_URL).toString();
          await sendMail(signInCodeMail(email, code, publicLink, CODE_MINUTES));
        },
      },
      async ({ email, request }) => {
        const { to, cookie } = await signInAs(request, email);
        throw redirect(to, { headers: { 'Set-Cookie': cookie } });
      },
    ),
    'TOTP',
  );
  g.__parleyAuthenticator = a;
  return a;
}

/** The e-mail address waiting for a code, read from the strategy's own cookie. */
export function pendingSignInEmail(request: Request): string | null {
  const cookie = request.headers.get('Cookie') ?? '';
  const raw = cookie
    .split(/;\s*/)
    .find((c) => c.startsWith('_totp='))
    ?.slice('_totp='.length);
  if (!raw) return null;
  try {
    const params = new URLSearchParams(decodeURIComponent(raw));
    return params.get('email');
  } catch {
    return null;
  }
}

export function pendingSignInError(request: Request): string | null {
  const cookie = request.headers.get('Cookie') ?? '';
  const raw = cookie
    .split(/;\s*/)
    .find((c) => c.startsWith('_totp='))
    ?.slice('_totp='.length);
  if (!raw) return null;
  try {
    return new URLSearchParams(decodeURIComponent(raw)).get('error');
  } catch {
    return null;
  }
}
