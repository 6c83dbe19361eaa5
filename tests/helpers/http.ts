// A small cookie-keeping HTTP client for tests that use the app as a browser without JS would.
import fs from 'node:fs';
import path from 'node:path';
import { latestSignInCode, mailTo } from './mail';

export const baseUrl = () => process.env.PARLEY_TEST_URL!;

export class Client {
  cookies = new Map<string, string>();

  constructor(readonly base: string = baseUrl()) {}

  /** The same signed-in browser talking to another server (same secrets, same database). */
  at(base: string) {
    const c = new Client(base);
    c.cookies = new Map(this.cookies);
    return c;
  }

  cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  /** Keeps the cookies a response sets, as a browser does. */
  remember(res: Response) {
    for (const line of res.headers.getSetCookie()) {
      const [pair, ...attrs] = line.split(';');
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      const expired = attrs.some((a) => /max-age=0\b/i.test(a) || /expires=Thu, 01 Jan 1970/i.test(a));
      if (expired || value === '') this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
  }

  async get(path: string) {
    const res = await fetch(new URL(path, this.base), { headers: { cookie: this.cookieHeader() }, redirect: 'manual' });
    this.remember(res);
    return res;
  }

  async post(path: string, fields: Record<string, string | number>) {
    const body = new URLSearchParams(Object.entries(fields).map(([k, v]) => [k, String(v)]));
    const res = await fetch(new URL(path, this.base), {
      method: 'POST',
      headers: { cookie: this.cookieHeader(), 'content-type': 'application/x-www-form-urlencoded', origin: this.base },
      body,
      redirect: 'manual',
    });
    this.remember(res);
    return res;
  }

  /** A multipart POST (file uploads), as a browser without JS sends it. */
  async postForm(path: string, form: FormData) {
    const res = await fetch(new URL(path, this.base), {
      method: 'POST',
      headers: { cookie: this.cookieHeader(), origin: this.base },
      body: form,
      redirect: 'manual',
    });
    this.remember(res);
    return res;
  }
}

/** Signs in through the real flow: e-mail form → code read from maildev → code form. */
export async function signIn(email: string): Promise<Client> {
  const shared = SHARED_ACCOUNT.test(email);
  if (shared) {
    const kept = keptSignIn(email);
    if (kept && (await isSignedIn(kept))) return kept;
  }
  const c = new Client();
  const before = (await mailTo(email)).filter((m) => /sign-in code/.test(m.subject)).length;
  const r1 = await c.post('/sign-in', { email });
  if (r1.status !== 302 || r1.headers.get('location') !== '/sign-in/code') throw new Error(`sign-in answered ${r1.status}`);
  const { code } = await latestSignInCode(email, before + 1);
  const r2 = await c.post('/sign-in/code', { intent: 'verify', code });
  if (r2.status !== 302 || !(await isSignedIn(c))) throw new Error(`code check answered ${r2.status} ${r2.headers.get('location')}`);
  if (shared) keepSignIn(email, c);
  return c;
}

/**
 * The demo's seeded accounts are signed in by many test files; the app allows 5 codes per address
 * and network in 15 minutes (a lock-out the security tests check), which a whole suite run would
 * exceed. So one sign-in per run is kept in the test data folder and reused while it still works
 * (the database is fresh each run, so a kept cookie of an earlier run simply fails the check).
 */
const SHARED_ACCOUNT = /@halvorsen\.example$/;
const keptDir = () => path.resolve('.data/test/sign-ins');

function keptSignIn(email: string): Client | null {
  try {
    const c = new Client();
    c.cookies = new Map(JSON.parse(fs.readFileSync(path.join(keptDir(), `${email}.json`), 'utf8')) as [string, string][]);
    return c;
  } catch {
    return null;
  }
}

function keepSignIn(email: string, c: Client) {
  fs.mkdirSync(keptDir(), { recursive: true });
  fs.writeFileSync(path.join(keptDir(), `${email}.json`), JSON.stringify([...c.cookies]));
}

/** Signed in when a page for signed-in users answers instead of redirecting to sign-in. */
export async function isSignedIn(c: Client) {
  return (await c.get('/courses')).status === 200;
}

let counter = 0;
/** A fresh address nobody else in this run uses. */
export function uniqueEmail(prefix = 'user') {
  counter += 1;
  return `${prefix}-${process.pid}-${Date.now().toString(36)}-${counter}@tests.parley.test`;
}

/** A server-rendered page's text as a person reads it: tags and React's markers out, entities decoded. */
export function pageText(html: string) {
  return (
    html
      .replace(/<!-- -->/g, '')
      // an e-mail address (EmailAddress in app/components/ui.tsx) reads as one word
      .replace(/<wbr\s*\/?>/g, '')
      .replace(/<span class="whitespace-nowrap">([^<]*)<\/span>/g, '$1')
      .replace(/<[^>]+>/g, ' ')
      .replace(/&quot;/g, '"')
      .replace(/&#x27;/g, "'")
      .replace(/&lt;/g, '<')
      .replace(/&gt;/g, '>')
      .replace(/&amp;/g, '&')
      .replace(/\s+/g, ' ')
  );
}
