// Issue 9, finding 10, in a real browser: the Content-Security-Policy lets Parley's own pages work
// (no violation on pages with charts, sockets and forms), and another origin on the same site can
// no longer frame a staff page.
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, launch, newContext, pageErrors, signInInBrowser } from '#tests/helpers/browser';

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

/** Records every CSP violation the page reports, from the first script on. */
async function recordViolations(page: Page) {
  await page.addInitScript(() => {
    const violations: string[] = [];
    window.__violations = violations;
    document.addEventListener('securitypolicyviolation', (e) => violations.push(`${e.violatedDirective} ${e.blockedURI}`));
  });
  return () => page.evaluate(() => window.__violations);
}

describe('Content-Security-Policy, in Chromium', () => {
  it('pages with charts and forms run without a single violation (the live-session test covers the socket)', async () => {
    const page = await (await newContext(browser, DESKTOP)).newPage();
    const violations = await recordViolations(page);
    await page.goto('/sign-in');
    await signInInBrowser(page, 'm.achterberg@halvorsen.example');
    expect(await violations()).toEqual([]);
    await page.getByRole('link', { name: 'ECON 214 Strategy and Markets' }).click();
    await page.getByRole('link', { name: 'Debrief' }).click();
    await page.getByRole('checkbox', { name: /Short horizon/ }).check();
    await page.getByRole('checkbox', { name: /Long horizon/ }).check();
    await page.getByRole('button', { name: 'Compare the ticked sessions' }).click();
    const coop = page.locator('figure[data-chart="cooperation-by-supergame"]');
    // recharts has drawn (it draws after hydration, with inline style attributes).
    await expect.poll(() => coop.locator('.recharts-legend-wrapper li').count()).toBe(4);
    await expect.poll(() => coop.locator('svg path').count()).toBeGreaterThan(0);
    expect(await violations()).toEqual([]);
    await page.getByRole('link', { name: 'Projector mode' }).click();
    await expect.poll(() => page.getByRole('heading', { name: 'Cooperation by supergame' }).isVisible()).toBe(true);
    expect(await violations()).toEqual([]);
    expect(pageErrors).toEqual([]);
  });

  it('another origin on the same host cannot frame a staff page', async () => {
    // A context of its own: Chromium reports the refused frame as a console error, by design here.
    const ctx = await browser.newContext({ ...DESKTOP, baseURL: process.env.PARLEY_TEST_URL });
    const page = await ctx.newPage();
    await page.goto('/sign-in');
    await signInInBrowser(page, 'r.okafor@halvorsen.example');
    await page.getByRole('link', { name: 'ECON 214 Strategy and Markets' }).click();
    await page.getByRole('link', { name: 'Members' }).click();
    await expect.poll(() => page.getByRole('table', { name: 'Course members' }).isVisible()).toBe(true);
    const members = page.url();

    // The attacker's page: same host, another port (same site, so the sign-in cookie goes along).
    const evil = http.createServer((_req, res) => {
      res.writeHead(200, { 'content-type': 'text/html' });
      res.end(`<!doctype html><title>framing</title><iframe name="victim" src="${members}" width="1200" height="800"></iframe>`);
    });
    await new Promise<void>((resolve) => evil.listen(0, '127.0.0.1', resolve));
    try {
      const framer = await ctx.newPage();
      await framer.goto(`http://127.0.0.1:${(evil.address() as AddressInfo).port}/`);
      const frame = framer.frame({ name: 'victim' })!;
      expect(frame).toBeTruthy();
      // The frame has finished loading whatever it would; a refused frame never shows the page.
      await framer.waitForLoadState('load');
      await frame.waitForLoadState('load');
      const shown = await frame
        .getByRole('table', { name: 'Course members' })
        .count()
        .catch(() => 0);
      expect(shown).toBe(0);
    } finally {
      evil.close();
      await ctx.close();
    }
  });
});
