// Debian's chromium driven by playwright-core (never a downloaded browser).
import { type Browser, type BrowserContext, type BrowserContextOptions, chromium, type Page } from 'playwright-core';
import { expect } from 'vitest';
import type { Client } from './http';
import { latestSignInCode, mailTo } from './mail';

export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export function launch(): Promise<Browser> {
  return chromium.launch({ executablePath: process.env.PARLEY_CHROMIUM ?? '/usr/bin/chromium', headless: true, args: CHROMIUM_ARGS });
}

export const PHONE = { viewport: { width: 390, height: 844 }, deviceScaleFactor: 2, isMobile: true, hasTouch: true };
export const DESKTOP = { viewport: { width: 1440, height: 900 } };

/** A context that fails the test on any page error or console error. */
export async function newContext(
  browser: Browser,
  opts: typeof PHONE | typeof DESKTOP = DESKTOP,
  extra: BrowserContextOptions = {},
): Promise<BrowserContext> {
  const ctx = await browser.newContext({ ...opts, ...extra, baseURL: process.env.PARLEY_TEST_URL });
  ctx.on('page', watch);
  return ctx;
}

export const pageErrors: string[] = [];
function watch(page: Page) {
  page.on('pageerror', (e) => pageErrors.push(`${page.url()}: ${e.message}`));
  page.on('console', (m) => {
    // A 400/403/404/409 answer logs a resource error by design; everything else is a defect.
    if (m.type() === 'error' && !/status of 4(00|03|04|09)/.test(m.text())) pageErrors.push(`${page.url()}: ${m.text()}`);
  });
}

/** Both sizes every page is looked at in, with a name for screenshot files. */
export const SIZES = [
  [DESKTOP, 'desktop'],
  [PHONE, 'phone'],
] as const;

/** A new page at this size, signed in as `email` through the real flow. */
export async function signedInPage(browser: Browser, email: string, size: typeof PHONE | typeof DESKTOP = DESKTOP): Promise<Page> {
  const page = await (await newContext(browser, size)).newPage();
  await page.goto('/sign-in');
  await signInInBrowser(page, email);
  return page;
}

/** The whole sign-in as a person does it: type the e-mail, read the code in the mail, type it. */
export async function signInInBrowser(page: Page, email: string) {
  const before = (await mailTo(email)).filter((m) => /sign-in code/.test(m.subject)).length;
  await expect.poll(() => page.url()).toContain('/sign-in');
  await page.getByLabel('E-mail address').fill(email);
  await page.getByRole('button', { name: 'E-mail me a code' }).click();
  await expect.poll(() => page.url()).toContain('/sign-in/code');
  const { code } = await latestSignInCode(email, before + 1);
  await page.getByLabel('Sign-in code').fill(code);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect.poll(() => page.url()).not.toContain('/sign-in');
}

/** A context at this size carrying a test client's sign-in cookies: that client's browser (none: signed out). */
export async function contextAs(
  browser: Browser,
  client: Client | null,
  size: typeof PHONE | typeof DESKTOP = DESKTOP,
  extra: BrowserContextOptions = {},
): Promise<BrowserContext> {
  const ctx = await newContext(browser, size, extra);
  if (client) await ctx.addCookies([...client.cookies].map(([name, value]) => ({ name, value, url: process.env.PARLEY_TEST_URL! })));
  return ctx;
}

/** A new page at this size carrying a test client's sign-in cookies, opened at `url`. Dialogs are accepted. */
export async function pageAs(browser: Browser, client: Client, url: string, size: typeof PHONE | typeof DESKTOP = DESKTOP): Promise<Page> {
  const ctx = await contextAs(browser, client, size);
  const page = await ctx.newPage();
  page.on('dialog', (d) => void d.accept());
  await page.goto(url);
  return page;
}
