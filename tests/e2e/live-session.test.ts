import { eq } from 'drizzle-orm';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { choices, sessionParticipants } from '#drizzle/schema';
import { DESKTOP, launch, newContext, pageErrors, PHONE, signInInBrowser } from '#tests/helpers/browser';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { uniqueEmail } from '#tests/helpers/http';
import { createDesign } from '#tests/helpers/live';

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
  await closeTestDb();
});

/** Plays as a person would until the final page: taps a button whenever asked, notes each tap. */
async function playToTheEnd(page: Page, pick: (round: number) => 'X' | 'Y') {
  const taps: { supergame: number; round: number; action: 'C' | 'D' }[] = [];
  for (let guard = 0; guard < 200; guard++) {
    const final = page.getByTestId('final-points');
    const button = page.locator('button:enabled', { hasText: /^[◆●](X|Y)$/ }).first();
    await Promise.race([final.waitFor({ timeout: 30_000 }), button.waitFor({ timeout: 30_000 })]);
    if (await final.isVisible()) return { taps, points: Number((await final.textContent())!.replace(/\D+/g, '')) };
    const title = (await page.getByTestId('round-title').textContent())!;
    const [, sg, rd] = /Supergame (\d+) of \d+ · Round (\d+)/.exec(title)!;
    const label = pick(Number(rd));
    await page.getByRole('button', { name: label, exact: true }).click();
    taps.push({ supergame: Number(sg), round: Number(rd), action: label === 'X' ? 'C' : 'D' });
    // Then the page says it waits for the partner, or has already moved on to the next round.
    await expect
      .poll(
        async () =>
          (await page.getByTestId('waiting').isVisible()) ||
          (await final.isVisible()) ||
          (await page.getByTestId('round-title').textContent()) !== title,
        { timeout: 30_000 },
      )
      .toBe(true);
  }
  throw new Error('the session did not end');
}

describe('a live session in Chromium', () => {
  it('an instructor opens and starts; four phones join by code and play two supergames; an assistant watches the Floor', async () => {
    const emails = {
      instructor: uniqueEmail('e2e-inst'),
      assistant: uniqueEmail('e2e-ta'),
      players: [0, 1, 2, 3].map((i) => uniqueEmail(`e2e-p${i}`)),
    };
    const instructorId = await createUser(emails.instructor, 'Instructor E2E');
    const assistantId = await createUser(emails.assistant, 'Assistant E2E');
    const playerIds = await Promise.all(emails.players.map((e, i) => createUser(e, `Player ${i}`)));
    const courseId = await createCourse('Live class', [
      { userId: instructorId, role: 'instructor' },
      { userId: assistantId, role: 'assistant' },
      ...playerIds.map((userId) => ({ userId, role: 'participant' as const })),
    ]);
    await createDesign(courseId, instructorId, { supergames: 2, delta: 0.5, roundSeconds: 90 });

    const inst = await (await newContext(browser, DESKTOP)).newPage();
    await inst.goto('/sign-in');
    await signInInBrowser(inst, emails.instructor);
    await inst.goto(`/courses/${courseId}/sessions`);
    await inst.getByRole('button', { name: 'Open session' }).click();
    await inst.getByTestId('join-code').waitFor();
    const code = (await inst.getByTestId('join-code').textContent())!.trim();
    const sessionId = Number(/sessions\/(\d+)/.exec(inst.url())![1]);

    const ta = await (await newContext(browser, DESKTOP)).newPage();
    await ta.goto('/sign-in');
    await signInInBrowser(ta, emails.assistant);
    await ta.goto(`/courses/${courseId}/sessions/${sessionId}/floor`);

    const phones: Page[] = [];
    for (const email of emails.players) {
      const phone = await (await newContext(browser, PHONE)).newPage();
      await phone.goto('/join');
      await phone.getByLabel('Join code').fill(code.toLowerCase());
      await phone.getByRole('button', { name: 'Continue' }).click();
      await signInInBrowser(phone, email);
      await phone.getByRole('button', { name: 'I have read this — join' }).click();
      await phone.getByRole('heading', { name: 'You are in' }).waitFor();
      phones.push(phone);
    }
    await expect.poll(() => inst.getByTestId('live-counts').textContent()).toContain('Joined4');

    await inst.getByRole('button', { name: 'Start the session' }).click();
    await expect.poll(() => ta.getByTestId('floor-pair').count()).toBe(2);

    const results = await Promise.all(phones.map((p, i) => playToTheEnd(p, (round) => ((i + round) % 2 === 0 ? 'X' : 'Y'))));
    await expect.poll(() => inst.getByTestId('session-status').textContent()).toContain('Complete');

    // What the phones showed is what was stored.
    const rows = await testDb().select().from(choices).where(eq(choices.sessionId, sessionId));
    const keys = await testDb().select().from(sessionParticipants).where(eq(sessionParticipants.sessionId, sessionId));
    const { R, S, T, P } = { R: 40, S: 12, T: 50, P: 25 };
    const pay = (own: string, other: string) => (own === 'C' ? (other === 'C' ? R : S) : other === 'C' ? T : P);
    for (let i = 0; i < 4; i++) {
      const key = keys.find((k) => k.userId === playerIds[i])!.participantKey;
      const mine = rows.filter((r) => r.participantKey === key).sort((a, b) => a.supergame - b.supergame || a.round - b.round);
      expect(mine.map((r) => ({ supergame: r.supergame, round: r.round, action: r.action }))).toEqual(results[i].taps);
      expect(mine.every((r) => r.source === 'player')).toBe(true);
      const points = mine.reduce((sum, r) => {
        const partner = rows.find((o) => o.supergame === r.supergame && o.round === r.round && o.pairId === r.pairId && o.seat !== r.seat)!;
        return sum + pay(r.action, partner.action);
      }, 0);
      expect(results[i].points).toBe(points);
    }
    expect(pageErrors).toEqual([]);
  });
});
