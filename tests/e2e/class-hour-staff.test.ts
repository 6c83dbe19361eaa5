// The class hour from the staff side in Chromium (issue 12): the Conductor's messages, the Floor
// of a finished session, cancelling an opened session and the lobby's actions.
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launch, newContext, pageAs, pageErrors, PHONE } from '#tests/helpers/browser';
import { closeTestDb } from '#tests/helpers/db';
import { type Client } from '#tests/helpers/http';
import { classOf, closeSockets, connect } from '#tests/helpers/live';

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  closeSockets();
  await browser?.close();
  await closeTestDb();
});

const hourClass = (n: number) => classOf(n, { design: { supergames: 3, delta: 0.9, roundSeconds: 60 }, tag: 'chs', title: 'Class hour' });

async function staffPage(client: Client, path: string): Promise<Page> {
  const page = await pageAs(browser, client, path);
  await expect.poll(async () => /\bLive\b/.test(await page.evaluate(() => document.body.innerText))).toBe(true);
  return page;
}

describe('the class hour, staff pages', () => {
  it("the Conductor shows each command's own result, and none once the session has moved on", async () => {
    const { courseId, sessionId, instructor } = await hourClass(2);
    const page = await staffPage(instructor, `/courses/${courseId}/sessions/${sessionId}`);
    const status = page.getByTestId('session-status');

    await page.getByRole('button', { name: 'Start the session' }).click();
    await expect.poll(() => status.textContent()).toContain('Running');
    // Before the fix: "Done: the session is running.", after Start and after every other command.
    await expect.poll(() => page.getByText('Started: phones are being paired for supergame 1.').isVisible()).toBe(true);

    await page.getByRole('button', { name: 'End after this supergame' }).click();
    await expect.poll(() => page.getByRole('button', { name: 'Ends after this supergame' }).isVisible()).toBe(true);
    await expect.poll(() => page.getByText('The session will end when the current supergame is over.').isVisible()).toBe(true);
    expect(await page.getByText('Started: phones are being paired').count()).toBe(0);

    await page.getByRole('button', { name: 'End now' }).click();
    await expect.poll(() => status.textContent()).toContain('Complete');
    await expect.poll(() => page.getByText('Ended: everyone sees their final points.').isVisible()).toBe(true);
    // Nothing under "Complete" still says the session is running.
    expect(await page.locator('main').textContent()).not.toMatch(/is running|will end when/);
    expect(pageErrors).toEqual([]);
  });

  it('the Floor of a completed session offers no Nudge and no Hand to computer', async () => {
    const { courseId, sessionId, instructor } = await hourClass(2);
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'start' })).ok).toBe(true);
    const page = await staffPage(instructor, `/courses/${courseId}/sessions/${sessionId}/floor`);
    await expect.poll(() => page.getByRole('button', { name: /^Nudge/ }).count()).toBe(2);

    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'end-now' })).ok).toBe(true);
    await expect.poll(async () => /\bComplete\b/.test(await page.evaluate(() => document.body.innerText))).toBe(true);
    // Before the fix: both buttons stayed on every seat row of the finished session.
    await expect.poll(() => page.getByRole('button', { name: /^Nudge/ }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /^Hand to computer/ }).count()).toBe(0);
    expect(pageErrors).toEqual([]);
  });

  it('an opened session can be cancelled before the start: the code dies and the lobby is told; a lobby participant can be removed', async () => {
    const { courseId, sessionId, code, instructor, players } = await hourClass(3);
    const phones: Page[] = [];
    for (const p of players) {
      const ctx = await newContext(browser, PHONE);
      await ctx.addCookies([...p.cookies].map(([name, value]) => ({ name, value, url: process.env.PARLEY_TEST_URL! })));
      const phone = await ctx.newPage();
      await phone.goto(`/play/${sessionId}`);
      await phone.getByRole('heading', { name: 'You are in' }).waitFor();
      phones.push(phone);
    }
    // One phone goes to sleep in the lobby: not an alert, nothing waits for it yet.
    await phones[2].context().close();

    const floor = await staffPage(instructor, `/courses/${courseId}/sessions/${sessionId}/floor`);
    const lobbyRemove = floor.getByRole('button', { name: /^Remove P-001/ });
    // Before the fix: no action at all for a participant in the lobby.
    await lobbyRemove.waitFor();
    expect(await floor.getByRole('heading', { name: 'Alerts' }).count()).toBe(0);
    await lobbyRemove.click();
    await phones[0].getByRole('heading', { name: 'The session is over' }).waitFor();
    await phones[0].getByText('The instructor took you out of the session.').waitFor();

    const conductor = await staffPage(instructor, `/courses/${courseId}/sessions/${sessionId}`);
    await conductor.getByRole('button', { name: 'Cancel the session' }).click();
    await expect.poll(() => conductor.getByTestId('session-status').textContent()).toContain('Cancelled');
    expect(await conductor.getByTestId('join-code').count()).toBe(0);
    await phones[1].getByRole('heading', { name: 'The session was cancelled' }).waitFor();

    // The code no longer opens anything.
    const late = await (await newContext(browser, PHONE)).newPage();
    await late.goto('/join');
    await late.getByLabel('Join code').fill(code);
    await late.getByRole('button', { name: 'Continue' }).click();
    await late.getByText('No session is open with this code').waitFor();
    expect(pageErrors).toEqual([]);
  });
});
