// The phone's choice and the Conductor's commands from the keyboard alone, and what a screen reader
// is told: changes that matter sit in live regions, the ticking countdown does not.
import type { Browser, Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, launch, pageAs as pageOf, pageErrors, PHONE } from '#tests/helpers/browser';
import { closeTestDb } from '#tests/helpers/db';
import type { Client } from '#tests/helpers/http';
import { classOf, closeSockets, connect, nextView } from '#tests/helpers/live';

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  closeSockets();
  await browser?.close();
  await closeTestDb();
});

const pageAs = (client: Client, url: string, size: typeof DESKTOP | typeof PHONE) => pageOf(browser, client, url, size);

/** Presses Tab until the element is focused (as a keyboard user reaches it), at most 40 times. */
async function tabTo(page: Page, target: Locator) {
  for (let i = 0; i < 40; i++) {
    if (await target.evaluate((el) => el === document.activeElement)) return;
    await page.keyboard.press('Tab');
  }
  throw new Error('never reached by Tab');
}

/** The politeness a screen reader applies to this element's changes ('off' when none). */
const liveness = (l: Locator) =>
  l.evaluate((el) => {
    for (let a: Element | null = el; a; a = a.parentElement) {
      const live = a.getAttribute('aria-live');
      if (live) return live;
      const role = a.getAttribute('role');
      if (role === 'status' || role === 'log') return 'polite';
      if (role === 'alert') return 'assertive';
    }
    return 'off';
  });

describe('keyboard and screen readers', () => {
  it('the Conductor starts the session from the keyboard and its status is announced; the phone chooses from the keyboard and hears the round', async () => {
    // Seed 2: the first draw is 14, so supergame 1 has a round 2 (with a random seed it ends after
    // round 1 one time in ten at δ = 0.9, and round 2 never comes)
    const { courseId, sessionId, instructor, players } = await classOf(2, {
      design: { supergames: 2, delta: 0.9, roundSeconds: 120 },
      tag: 'kb',
      open: { seed: '2' },
    });
    const [me, other] = players;
    const otherSocket = await connect(other.cookieHeader());
    expect((await otherSocket.emitWithAck('session:watch', { sessionId, as: 'participant' })).ok).toBe(true);

    const phone = await pageAs(me, `/play/${sessionId}`, PHONE);
    await phone.getByRole('heading', { name: 'You are in' }).waitFor();

    const conductor = await pageAs(instructor, `/courses/${courseId}/sessions/${sessionId}`, DESKTOP);
    await expect.poll(async () => /\bLive\b/.test(await conductor.evaluate(() => document.body.innerText))).toBe(true);
    const status = conductor.getByTestId('session-status');
    // Before the fix the status line was in no live region: "Running" was never announced.
    expect(await liveness(status)).toBe('polite');
    await tabTo(conductor, conductor.getByRole('button', { name: 'Start the session' }));
    await conductor.keyboard.press('Enter');
    await expect.poll(() => status.textContent()).toContain('Running');
    const result = conductor.getByText('Started: phones are being paired for supergame 1.');
    await result.waitFor();
    expect(await liveness(result)).not.toBe('off');
    // Start is gone once the session runs; before the fix focus fell back to the page's top, so the
    // next Tab started over at the skip link. Focus now rests on the status line.
    await expect
      .poll(() => conductor.evaluate(() => document.activeElement?.getAttribute('data-testid') ?? document.activeElement?.tagName))
      .toBe('session-status');

    // The phone: the round's title and the prompt are announced, the ticking countdown is not.
    const title = phone.getByTestId('round-title');
    await title.waitFor();
    expect(await liveness(title)).toBe('polite');
    expect(await liveness(phone.getByTestId('countdown'))).toBe('off');
    await tabTo(phone, phone.getByRole('button', { name: /^X$|X$/ }));
    await phone.keyboard.press('Enter');
    const waiting = phone.getByTestId('waiting');
    await expect.poll(() => waiting.textContent()).toContain('You chose');
    expect(await liveness(waiting)).toBe('polite');

    // The partner chooses: the result of round 1 and the next round's title are announced.
    const next = nextView(otherSocket, (v) => v.round === 2);
    expect(
      await otherSocket.emitWithAck('choice:submit', {
        sessionId,
        supergame: 1,
        round: 1,
        action: 'D',
        clientChoiceId: `keyboard-${sessionId}-round1`,
      }),
    ).toMatchObject({ ok: true });
    await next;
    await expect.poll(() => title.textContent()).toContain('Round 2');
    const last = phone.getByTestId('last-result');
    await expect.poll(() => last.textContent()).toContain('Round 1');
    expect(await liveness(last)).toBe('polite');
    expect(pageErrors).toEqual([]);
  });
});
