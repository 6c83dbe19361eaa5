// The phone during play (issue 12, bug 1 and "Phones"): a tap made while the network is off is
// kept and sent when the phone is back online, and the screen says so instead of "Not recorded".
import { and, eq } from 'drizzle-orm';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { choices, sessionParticipants } from '#drizzle/schema';
import { launch, newContext, pageErrors, PHONE } from '#tests/helpers/browser';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, connect, createDesign, join, nextView, openSession } from '#tests/helpers/live';

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  closeSockets();
  await browser?.close();
  await closeTestDb();
});

/** A course with an instructor and `n` participants, all signed in over HTTP and joined. */
async function classOf(n: number, design: Parameters<typeof createDesign>[2]) {
  const emails = { instructor: uniqueEmail('ob-inst'), players: Array.from({ length: n }, (_, i) => uniqueEmail(`ob-p${i}`)) };
  const instructorId = await createUser(emails.instructor, 'Instructor');
  const playerIds = await Promise.all(emails.players.map((e, i) => createUser(e, `Player ${i}`)));
  const courseId = await createCourse('Outbox', [{ userId: instructorId, role: 'instructor' }, ...playerIds.map((userId) => ({ userId, role: 'participant' as const }))]);
  const designId = await createDesign(courseId, instructorId, design);
  const instructor = await signIn(emails.instructor);
  const players = await Promise.all(emails.players.map((e) => signIn(e)));
  const { sessionId, code } = await openSession(instructor, courseId, designId);
  for (const p of players) await join(p, code);
  return { sessionId, instructor, players, playerIds };
}

/** A phone carrying a participant's sign-in cookie. */
async function phoneOf(client: Client): Promise<{ ctx: BrowserContext; page: Page }> {
  const ctx = await newContext(browser, PHONE);
  await ctx.addCookies([...client.cookies].map(([name, value]) => ({ name, value, url: process.env.PARLEY_TEST_URL! })));
  return { ctx, page: await ctx.newPage() };
}

const text = (page: Page) => page.evaluate(() => document.body.innerText);

async function participantKey(sessionId: number, userId: number) {
  const [row] = await testDb()
    .select({ key: sessionParticipants.participantKey })
    .from(sessionParticipants)
    .where(and(eq(sessionParticipants.sessionId, sessionId), eq(sessionParticipants.userId, userId)));
  return row.key;
}

describe('the phone during play', () => {
  it('keeps a tap made offline and sends it when the network is back; the round resolves with it', async () => {
    const { sessionId, instructor, players, playerIds } = await classOf(2, { roundSeconds: 40, supergames: 1, delta: 0.5, labels: { C: 'Cooperate', D: 'Defect' } });
    const { ctx, page } = await phoneOf(players[0]);
    await page.goto(`/play/${sessionId}`);
    await page.getByRole('heading', { name: 'You are in' }).waitFor();
    await expect.poll(async () => /\bconnected\b/.test(await text(page))).toBe(true);
    const partner = await connect(players[1].cookieHeader());
    const watched = await partner.timeout(8000).emitWithAck('session:watch', { sessionId, as: 'participant' });
    expect(watched.ok).toBe(true);

    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'start' })).ok).toBe(true);
    await page.getByTestId('round-title').waitFor();

    // The browser's offline switch: the socket drops, the page learns it from the browser.
    await ctx.setOffline(true);
    await expect.poll(async () => /offline|reconnecting/i.test(await text(page))).toBe(true);
    // The buttons say what a tap does now.
    await expect.poll(() => text(page)).toMatch(/sent when you are back online/i);
    await page.getByRole('button', { name: 'Defect' }).click();
    // The tap is kept, shown, and both buttons wait for it to be sent.
    await expect.poll(() => text(page)).toMatch(/Your choice \(● ?Defect\) will be sent when you are back online/);
    const offlineText = await text(page);
    expect(offlineText).not.toMatch(/Not recorded/);
    expect(await page.getByRole('button', { name: 'Defect' }).isDisabled()).toBe(true);
    expect(await page.getByRole('button', { name: 'Defect' }).getAttribute('aria-pressed')).toBe('true');
    expect(await page.getByRole('button', { name: 'Cooperate' }).isDisabled()).toBe(true);
    await page.screenshot({ path: '/tmp/parley-phone-offline-choice.png' });

    // A few seconds later the network comes back, with most of the round left.
    await new Promise((r) => setTimeout(r, 3000));
    await ctx.setOffline(false);
    const key = await participantKey(sessionId, playerIds[0]);
    // Before the fix: nothing was sent again, and 40 s later the timeout rule filled the choice.
    await expect
      .poll(async () => (await testDb().select().from(choices).where(and(eq(choices.sessionId, sessionId), eq(choices.participantKey, key!)))).map((r) => `${r.supergame}/${r.round} ${r.action} ${r.source}`), {
        timeout: 20_000,
      })
      .toEqual(['1/1 D player']);
    await expect.poll(() => text(page)).toMatch(/You chose ● ?Defect/);

    // The partner chooses; the round resolves with the phone's own Defect, not a timeout.
    const resolved = nextView(partner, (v) => v.lastResult?.round === 1);
    const ack = await partner.timeout(8000).emitWithAck('choice:submit', { sessionId, supergame: 1, round: 1, action: 'C', clientChoiceId: 'partner-1-1-xyz' });
    expect(ack.ok).toBe(true);
    expect((await resolved).lastResult).toMatchObject({ own: 'C', partner: 'D' });
    await expect.poll(() => page.getByTestId('last-result').textContent()).toMatch(/Round 1: you ● ?Defect, partner ◆ ?Cooperate/);
    expect(await text(page)).not.toMatch(/back online|Not recorded/);
    expect(pageErrors.splice(0).filter((e) => !/ERR_INTERNET_DISCONNECTED|WebSocket/.test(e))).toEqual([]);
  });

  it('tells a partner in plain words what the computer that took the other seat does, and the handed-over participant that the supergame goes on', async () => {
    const { sessionId, instructor, players, playerIds } = await classOf(2, { roundSeconds: 60, supergames: 2, delta: 0.9, labels: { C: 'Cooperate', D: 'Defect' } });
    const phones = await Promise.all(players.map((p) => phoneOf(p)));
    for (const { page } of phones) {
      await page.goto(`/play/${sessionId}`);
      await page.getByRole('heading', { name: 'You are in' }).waitFor();
      await expect.poll(async () => /\bconnected\b/.test(await text(page))).toBe(true);
    }
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'start' })).ok).toBe(true);
    const [stays, leaves] = phones.map((p) => p.page);
    await stays.getByTestId('round-title').waitFor();

    // The second participant is away; the assistant hands the seat to tit-for-tat.
    const key = await participantKey(sessionId, playerIds[1]);
    const handed = await staff.timeout(8000).emitWithAck('participant:act', { sessionId, participantId: key!, action: 'hand-to-computer', strategy: 'TFT' });
    expect(handed.ok).toBe(true);

    // Before the fix: "a computer that follows a fixed rule (TFT)".
    await stays.getByText('Your partner is a computer', { exact: true }).waitFor();
    expect.soft(await text(stays)).toContain(
      'The participant you were paired with left, so for the rest of this supergame your partner is a computer that starts with Cooperate and then copies what you did last round.',
    );
    expect.soft(await text(stays)).not.toMatch(/TFT|fixed rule|Tit-for-tat/);
    await stays.screenshot({ path: '/tmp/parley-phone-computer-partner.png' });

    // The supergame goes on for the pair: the handed-over participant is not told it is over.
    // Before the fix: "Supergame 1 is over" while the computer played on in the seat.
    await expect.poll(() => leaves.locator('h1').textContent()).not.toContain('Round 1');
    expect(await leaves.locator('h1').textContent()).toBe('A computer plays for you in this supergame');
    const told = await text(leaves);
    expect(told).not.toMatch(/Supergame 1 is over/);
    expect(told).toMatch(/a computer took your seat for the rest of supergame 1/);
    await leaves.screenshot({ path: '/tmp/parley-phone-handed-over.png' });

    // The pair plays on against the computer: a tap is recorded and answered by tit-for-tat.
    await stays.getByRole('button', { name: 'Defect' }).click();
    await expect.poll(() => stays.getByTestId('last-result').textContent()).toMatch(/Round 1: you ● ?Defect, partner ◆ ?Cooperate/);
    expect(pageErrors.splice(0)).toEqual([]);
  });
});
