import fs from 'node:fs';
import nodemailer, { type Transporter } from 'nodemailer';
import { env } from './env.server';
import { remember } from './remember.server';

export interface Mail {
  to: string;
  subject: string;
  text: string;
  html: string;
}

/**
 * A mail that did not go out. Its message is fit to show to anyone (no host, port or server
 * reply); the original error is `cause` and is logged on the server.
 */
export class MailNotSentError extends Error {
  constructor(options?: { cause?: unknown }) {
    super('We could not send the e-mail. Please try again in a moment.', options);
    this.name = 'MailNotSentError';
  }
}

/**
 * A transport that gives up within SMTP_TIMEOUT_MS at each step: nodemailer's defaults wait up to
 * 2 minutes to connect and 30 s for the greeting, and a sign-in or invitation should not hang that
 * long when the mail server is down.
 */
export function createMailTransport(url: string = env().SMTP_URL, timeoutMs: number = env().SMTP_TIMEOUT_MS): Transporter {
  // Pooled: a lecture hall asks for hundreds of codes within minutes; a few kept-open connections
  // carry them instead of one new SMTP connection (and greeting) per mail.
  return nodemailer.createTransport({
    url,
    pool: true,
    maxConnections: 5,
    connectionTimeout: timeoutMs,
    greetingTimeout: timeoutMs,
    socketTimeout: timeoutMs,
  });
}

function transport() {
  return remember('mail-transport', createMailTransport);
}

/** The test seam: is this address listed in PARLEY_TEST_MAIL_FAULTS (read on every send)? */
function faultInjected(to: string) {
  const file = env().PARLEY_TEST_MAIL_FAULTS;
  if (!file) return false;
  let listed: string;
  try {
    listed = fs.readFileSync(file, 'utf8');
  } catch {
    return false;
  }
  return listed.split('\n').some((line) => line.trim().toLowerCase() === to.toLowerCase());
}

/** Sends one mail, or throws MailNotSentError (within a few seconds when the server is down). */
export async function sendMail(mail: Mail, via: Transporter = transport()) {
  try {
    if (faultInjected(mail.to)) throw new Error('mail fault injected by PARLEY_TEST_MAIL_FAULTS');
    await via.sendMail({ from: env().MAIL_FROM, ...mail });
  } catch (error) {
    // Neither the recipient nor the subject (it may carry a sign-in code) goes to the log.
    console.error('[mail] not sent:', error);
    throw new MailNotSentError({ cause: error });
  }
}

export function escapeHtml(s: string) {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** A plain, readable HTML frame: Parley's mails are short and must read well on a phone. */
export function htmlFrame(title: string, bodyHtml: string) {
  return `<!doctype html><html><body style="margin:0;background:#f8fafc;font-family:'Source Sans 3',Helvetica,Arial,sans-serif;color:#0f172a">
<div style="max-width:520px;margin:0 auto;padding:24px">
<p style="margin:0 0 16px;font-weight:700;color:#0e5357;letter-spacing:.04em">PARLEY</p>
<h1 style="font-size:22px;margin:0 0 16px">${escapeHtml(title)}</h1>
${bodyHtml}
</div></body></html>`;
}

export function signInCodeMail(email: string, code: string, magicLink: string, minutes: number): Mail {
  return {
    to: email,
    subject: `Your Parley sign-in code: ${code}`,
    text: [
      `Your sign-in code for Parley is ${code}`,
      '',
      `Type it on the sign-in page, or open this link on the same device:`,
      magicLink,
      '',
      `The code works for ${minutes} minutes. If you did not ask for it, ignore this e-mail: nobody can sign in without it.`,
    ].join('\n'),
    html: htmlFrame(
      'Your sign-in code',
      `<p style="font-size:16px">Type this code on the sign-in page:</p>
<p style="font-size:36px;font-weight:700;letter-spacing:.2em;margin:8px 0 24px" aria-label="Sign-in code">${escapeHtml(code)}</p>
<p><a href="${escapeHtml(magicLink)}" style="display:inline-block;background:#0e5357;color:#fff;padding:12px 20px;border-radius:8px;text-decoration:none;font-weight:600">Sign in on this device</a></p>
<p style="color:#475569;font-size:14px">The code works for ${minutes} minutes. If you did not ask for it, ignore this e-mail: nobody can sign in without it.</p>`,
    ),
  };
}

/**
 * Who sends an invitation or roster mail, as recipients read it: the name (if the account has one)
 * and always the signed-in address, which Parley has checked, so nobody can pose as someone else.
 */
export function senderOf(user: { name: string | null; email: string }) {
  return user.name ? `${user.name} (${user.email})` : user.email;
}

export function invitationMail(opts: {
  to: string;
  courseTitle: string;
  role: string;
  inviter: { name: string | null; email: string };
  link: string;
  days: number;
}): Mail {
  const article = /^[aeiou]/.test(opts.role) ? 'an' : 'a';
  const inviter = senderOf(opts.inviter);
  return {
    to: opts.to,
    subject: `Invitation to ${opts.courseTitle} on Parley, from ${opts.inviter.email}`,
    text: [
      `${inviter} invites you to join “${opts.courseTitle}” on Parley as ${article} ${opts.role}.`,
      '',
      `Accept the invitation here (you will sign in with a code sent to this address):`,
      opts.link,
      '',
      `The invitation is valid for ${opts.days} days. If you do not know ${opts.inviter.email}, ignore this e-mail.`,
    ].join('\n'),
    html: htmlFrame(
      `Join ${opts.courseTitle}`,
      `<p style="font-size:16px">${escapeHtml(inviter)} invites you to join <strong>${escapeHtml(opts.courseTitle)}</strong> on Parley as ${article} <strong>${escapeHtml(opts.role)}</strong>.</p>
<p><a href="${escapeHtml(opts.link)}" style="display:inline-block;background:#0e5357;color:#fff;padding:12px 20px;border-radius:8px;text-decoration:none;font-weight:600">See the invitation</a></p>
<p style="color:#475569;font-size:14px">You will sign in with a code sent to this address. The invitation is valid for ${opts.days} days. If you do not know ${escapeHtml(opts.inviter.email)}, ignore this e-mail.</p>`,
    ),
  };
}
