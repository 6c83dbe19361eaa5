// E-mailed one-time codes (remix-auth-totp) with Parley as the authority over whose code is whose.
//
// The library keeps the pending e-mail in its `_totp` cookie as plain text, beside an encrypted blob
// (JWE) holding only the code's secret and time; nothing ties the two together, so a browser that
// edits the e-mail could sign in as anyone with its own code. Parley therefore records every code it
// e-mails (sign_in_codes: SHA-256 of that JWE, the address, time, wrong tries, used) and signs in
// only when the record names the same address, has not been used and has tries left
// (docs/decisions/024). Limits on code requests count those rows per (address, network), per
// address and per network; wrong tries count per code, so nobody can lock another person out.
import { createHash } from 'node:crypto';
import { and, count, eq, gt, isNull, lt, min, sql } from 'drizzle-orm';
import { redirect } from 'react-router';
import { TOTPStrategy } from 'remix-auth-totp';
import { signInCodes } from '#drizzle/schema';
import { recordAuthEvent, signInAs } from './auth.server';
import { db } from './db.server';
import { env } from './env.server';
import { sendMail, signInCodeMail } from './mail.server';

export const CODE_MINUTES = 10;
const WINDOW_MINUTES = 15;

export const MESSAGES = {
  invalidTotp: 'That code is not right. Check the latest e-mail and try again.',
  expiredTotp: 'That code has expired. Ask for a new one.',
  rateLimitExceeded: 'Too many wrong codes. Ask for a new code.',
  missingSessionEmail: 'Start again: enter your e-mail address to get a code.',
  missingSessionTotp: 'That code is no longer valid. Ask for a new one.',
  used: 'That code has already been used. Ask for a new code if you need to sign in again.',
  dead: 'That code was typed wrong too often and no longer works. Ask for a new code.',
  unknown: 'That code is no longer valid. Ask for a new code.',
  mailFailed: 'We could not send the e-mail just now. Please try again in a minute.',
} as const;

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

// ── The strategy's cookie ────────────────────────────────────────────────────────────────────────

export interface PendingCode {
  email: string | null;
  /** the encrypted code data; its hash names the sign_in_codes row */
  jwe: string | null;
  error: string | null;
}

/** Reads a `_totp` value the way the library writes it: form-encoded, quoted only if needed. */
function parsePending(raw: string | undefined): PendingCode {
  if (!raw) return { email: null, jwe: null, error: null };
  const unquoted = raw.startsWith('"') && raw.endsWith('"') ? raw.slice(1, -1).replace(/\\(.)/g, '$1') : raw;
  const params = new URLSearchParams(unquoted);
  let jwe: string | null = null;
  try {
    const totp = JSON.parse(params.get('totp') ?? 'null') as { jwe?: unknown } | null;
    jwe = typeof totp?.jwe === 'string' ? totp.jwe : null;
  } catch {
    jwe = null;
  }
  return { email: params.get('email')?.toLowerCase() || null, jwe, error: params.get('error') || null };
}

/** The pending code of a request, from its Cookie header. */
export function pendingCode(request: Request): PendingCode {
  const raw = (request.headers.get('Cookie') ?? '')
    .split(/;\s*/)
    .find((c) => c.startsWith('_totp='))
    ?.slice('_totp='.length);
  return parsePending(raw);
}

/** The pending code a response of the strategy sets (after it issued a code, or failed). */
function pendingSetBy(response: Response): PendingCode | null {
  const line = response.headers.getSetCookie().find((c) => c.startsWith('_totp='));
  if (!line) return null;
  return parsePending(line.slice('_totp='.length).split(';')[0]);
}

// ── Limits on code requests ──────────────────────────────────────────────────────────────────────

export interface Limited {
  limited: true;
  retryAfterSeconds: number;
  reason: string;
}

/**
 * Before a code is e-mailed: at most CODE_REQUESTS_PER_EMAIL_AND_IP per address from one network,
 * CODE_REQUESTS_PER_EMAIL per address from anywhere (bounds guessing and mail to one person), and
 * CODE_REQUESTS_PER_IP per network (a lecture hall shares one address), each per 15 minutes.
 * Codes whose e-mail failed are never recorded, so they do not count.
 */
export async function checkCodeRequestLimits(email: string, ip: string): Promise<Limited | null> {
  const e = env();
  const since = new Date(Date.now() - WINDOW_MINUTES * 60_000);
  const recent = gt(signInCodes.createdAt, since);
  const checks = [
    {
      where: and(eq(signInCodes.email, email), eq(signInCodes.ip, ip), recent),
      max: e.CODE_REQUESTS_PER_EMAIL_AND_IP,
      reason: 'Too many codes were requested for this e-mail address.',
    },
    {
      where: and(eq(signInCodes.email, email), recent),
      max: e.CODE_REQUESTS_PER_EMAIL,
      reason: 'Too many codes were requested for this e-mail address.',
    },
    { where: and(eq(signInCodes.ip, ip), recent), max: e.CODE_REQUESTS_PER_IP, reason: 'Too many codes were requested from this network.' },
  ];
  for (const c of checks) {
    const [row] = await db()
      .select({ n: count(), oldest: min(signInCodes.createdAt) })
      .from(signInCodes)
      .where(c.where);
    if ((row?.n ?? 0) >= c.max) {
      const freeAt = (row?.oldest ?? new Date()).getTime() + WINDOW_MINUTES * 60_000;
      return { limited: true, reason: c.reason, retryAfterSeconds: Math.max(1, Math.ceil((freeAt - Date.now()) / 1000)) };
    }
  }
  return null;
}

// ── Issued codes ─────────────────────────────────────────────────────────────────────────────────

export type Issue = { sent: true } | { sent: false; message: string };

/**
 * Runs the strategy for a code request (new or resend) and records the code it e-mailed, bound to
 * the address it went to. The strategy always throws a redirect; this returns it (to be thrown by
 * the caller) unless the e-mail could not be sent, which the caller shows on its own form.
 */
export async function issueCode(forStrategy: Request, email: string, ip: string): Promise<{ issue: Issue; response: unknown }> {
  try {
    await totpStrategy(noCodeExpected).authenticate(forStrategy);
  } catch (thrown) {
    if (!(thrown instanceof Response)) throw thrown;
    const pending = pendingSetBy(thrown);
    if (!pending?.jwe || pending.error || pending.email !== email) {
      return { issue: { sent: false, message: pending?.error ?? MESSAGES.mailFailed }, response: thrown };
    }
    await db()
      .insert(signInCodes)
      .values({ tokenHash: sha256(pending.jwe), email, ip, expiresAt: new Date(Date.now() + CODE_MINUTES * 60_000) });
    return { issue: { sent: true }, response: thrown };
  }
  throw new Error('the sign-in strategy returned without a redirect');
}

export type CodeState = { ok: true } | { ok: false; reason: 'unknown' | 'used' | 'dead' | 'expired'; message: string };

/** Whether the pending code of a request may still be tried (for a clear message before trying). */
export async function codeState(pending: PendingCode): Promise<CodeState> {
  if (!pending.jwe || !pending.email) return { ok: false, reason: 'unknown', message: MESSAGES.unknown };
  const [row] = await db()
    .select()
    .from(signInCodes)
    .where(eq(signInCodes.tokenHash, sha256(pending.jwe)));
  if (!row || row.email !== pending.email) return { ok: false, reason: 'unknown', message: MESSAGES.unknown };
  if (row.usedAt) return { ok: false, reason: 'used', message: MESSAGES.used };
  if (row.failures >= env().CODE_WRONG_TRIES) return { ok: false, reason: 'dead', message: MESSAGES.dead };
  if (row.expiresAt.getTime() <= Date.now()) return { ok: false, reason: 'expired', message: MESSAGES.expiredTotp };
  return { ok: true };
}

/** The message for a refusal named in a redirect (the magic link sends its reason to the code page). */
export function refusalMessage(reason: string | null): string | null {
  const messages: Record<string, string> = {
    unknown: MESSAGES.unknown,
    used: MESSAGES.used,
    dead: MESSAGES.dead,
    expired: MESSAGES.expiredTotp,
  };
  return reason && Object.hasOwn(messages, reason) ? messages[reason] : null;
}

/** Counts a wrong try against the pending code (not against the address: see the file's head). */
export async function countWrongTry(pending: PendingCode, ip: string) {
  if (!pending.jwe || !pending.email) return;
  await db()
    .update(signInCodes)
    .set({ failures: sql`${signInCodes.failures} + 1` })
    .where(and(eq(signInCodes.tokenHash, sha256(pending.jwe)), isNull(signInCodes.usedAt)));
  await recordAuthEvent('code-failure', pending.email, ip);
}

/** True when the strategy's answer to a code or link is a failure (it sets an error to show). */
export function strategyFailed(thrown: unknown) {
  return thrown instanceof Response && Boolean(pendingSetBy(thrown)?.error);
}

/**
 * The authority: takes the code for exactly this address, once. One UPDATE, so two requests with
 * the same code cannot both win.
 */
async function claimCode(pending: PendingCode, email: string) {
  if (!pending.jwe) return false;
  const [res] = await db()
    .update(signInCodes)
    .set({ usedAt: new Date() })
    .where(
      and(
        eq(signInCodes.tokenHash, sha256(pending.jwe)),
        eq(signInCodes.email, email.toLowerCase()),
        isNull(signInCodes.usedAt),
        lt(signInCodes.failures, env().CODE_WRONG_TRIES),
        gt(signInCodes.expiresAt, new Date()),
      ),
    );
  return res.affectedRows === 1;
}

/** Forgets codes a day after they expired (a periodic job: app/jobs/all.server.ts). */
export async function pruneSignInCodes() {
  await db()
    .delete(signInCodes)
    .where(lt(signInCodes.expiresAt, new Date(Date.now() - 24 * 3600_000)));
}

// ── The strategy ─────────────────────────────────────────────────────────────────────────────────

/**
 * remix-auth-totp's strategy, made per use (it holds only its options): `verified` is what a code
 * that passed the library's check does next. The strategy answers everything else by throwing a
 * redirect with its cookie.
 */
function totpStrategy(verified: (email: string) => Promise<never>) {
  const e = env();
  return new TOTPStrategy(
    {
      secret: e.TOTP_SECRET,
      emailSentRedirect: '/sign-in/code',
      magicLinkPath: '/sign-in/link',
      successRedirect: '/',
      failureRedirect: '/sign-in/code',
      // Digits only: phones then show the number pad. The library's own attempt counter lives in
      // the cookie the client holds; Parley counts wrong tries per code in MariaDB instead.
      totpGeneration: { digits: 6, charSet: '0123456789', period: CODE_MINUTES * 60, maxAttempts: 5 },
      cookieOptions: { maxAge: CODE_MINUTES * 60, path: '/', ...(e.APP_URL.startsWith('https://') ? { secure: true as const } : {}) },
      customErrors: {
        invalidTotp: MESSAGES.invalidTotp,
        expiredTotp: MESSAGES.expiredTotp,
        rateLimitExceeded: MESSAGES.rateLimitExceeded,
        missingSessionEmail: MESSAGES.missingSessionEmail,
        missingSessionTotp: MESSAGES.missingSessionTotp,
      },
      sendTOTP: async ({ email, code, magicLink }) => {
        // Links in the e-mail must point at the public address, not the one the request came in on.
        const link = new URL(magicLink);
        const publicLink = new URL(link.pathname + link.search, e.APP_URL).toString();
        try {
          await sendMail(signInCodeMail(email, code, publicLink, CODE_MINUTES));
        } catch (error) {
          // The strategy shows an error's message to the user: never the mail server's own words
          // (sendMail has logged the cause).
          throw new Error(MESSAGES.mailFailed, { cause: error });
        }
      },
    },
    async ({ email }) => verified(email),
  );
}

/** A code request never reaches verification (no code in it); should it, it is refused. */
async function noCodeExpected(): Promise<never> {
  throw new Error(MESSAGES.unknown);
}

/**
 * Checks a typed code or a magic link (`forStrategy`) with the strategy; when it passes, Parley's
 * record of the pending code (read once by the caller) decides, then the sign-in starts. Always
 * throws: a redirect into the app with the sign-in cookie, or the strategy's redirect back to the
 * code page with its message (see strategyFailed).
 */
export async function verifyCode(forStrategy: Request, pending: PendingCode, signIn: { request: Request; ip: string }): Promise<never> {
  await totpStrategy(async (email) => {
    if (!(await claimCode(pending, email))) throw new Error(MESSAGES.unknown);
    const { to, cookie } = await signInAs(signIn.request, email, signIn.ip);
    throw redirect(to, { headers: { 'Set-Cookie': cookie } });
  }).authenticate(forStrategy);
  throw new Error('the sign-in strategy returned without a redirect');
}
