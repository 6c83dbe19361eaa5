// Before play (issue 12): the instructions page, the comprehension check, the practice supergame,
// instruction templates and the refusal to open a session whose instructions contradict its design.
import fs from 'node:fs';
import path from 'node:path';
import { count, eq } from 'drizzle-orm';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { choices, comprehensionAttempts, sessionParticipants } from '#drizzle/schema';
import { DESKTOP, launch, newContext, pageErrors, PHONE } from '#tests/helpers/browser';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { createDesign, openSession } from '#tests/helpers/live';

// Screenshots to look at after a run (not compared by the test), in a folder of their own.
const SHOTS = path.resolve('.data/test/screenshots/before-play');

let browser: Browser;
beforeAll(async () => {
  fs.mkdirSync(SHOTS, { recursive: true });
  browser = await launch();
});
afterAll(() => Promise.all([browser?.close(), closeTestDb()]));

/** A course with an instructor and one participant, both signed in over HTTP. */
async function courseWith(design: Parameters<typeof createDesign>[2]) {
  const emails = { instructor: uniqueEmail('bp-inst'), player: uniqueEmail('bp-p') };
  const instructorId = await createUser(emails.instructor, 'Dr. Ada Mensah');
  const playerId = await createUser(emails.player, 'Player One');
  const courseId = await createCourse('ECON 101 Games', [
    { userId: instructorId, role: 'instructor' },
    { userId: playerId, role: 'participant' },
  ]);
  const designId = await createDesign(courseId, instructorId, design);
  const instructor = await signIn(emails.instructor);
  const player = await signIn(emails.player);
  return { courseId, designId, instructor, player, playerId };
}

async function pageOf(client: Client, size: typeof PHONE | typeof DESKTOP = PHONE): Promise<{ ctx: BrowserContext; page: Page }> {
  const ctx = await newContext(browser, size);
  await ctx.addCookies([...client.cookies].map(([name, value]) => ({ name, value, url: process.env.PARLEY_TEST_URL! })));
  return { ctx, page: await ctx.newPage() };
}

const bodyText = (page: Page) => page.evaluate(() => document.body.innerText);

describe('before play, on a phone', () => {
  it('leads the instructions with the course and the instructor, and keeps consent within reach', async () => {
    const { courseId, designId, instructor, player } = await courseWith({ consent: true, delta: 0.75 });
    const { code } = await openSession(instructor, courseId, designId);
    const { page } = await pageOf(player);
    await page.goto(`/join/${code}`);
    await page.getByRole('heading', { level: 1, name: 'ECON 101 Games' }).waitFor();
    expect(await bodyText(page)).toContain('with Dr. Ada Mensah');
    expect(await page.getByTestId('summary').textContent()).toContain('the chance of another round with the same partner is 75%');
    // Before: the button sat 2.6 phone screens down. Now the consent question and the button
    // are within about one and a half screens (844 px each).
    const button = await page.getByRole('button', { name: 'I have read this — join' }).boundingBox();
    expect(button!.y + button!.height).toBeLessThan(844 * 1.5);
    await page.screenshot({ path: path.join(SHOTS, 'instructions-phone.png'), fullPage: true });
    // The full rules are one tap away.
    await page.getByText('All the rules, in full').click();
    await expect.poll(() => page.getByTestId('instructions').isVisible()).toBe(true);
    expect(await page.getByTestId('instructions').textContent()).toContain('If it is 75 or less, you play another round');
    expect(pageErrors.splice(0)).toEqual([]);
  });

  it('checks understanding before the lobby: a wrong answer is explained, right answers join; the Conductor sees who is stuck', async () => {
    const { courseId, designId, instructor, player, playerId } = await courseWith({
      consent: true,
      comprehension: true,
      delta: 0.8,
      labels: { C: 'Blue', D: 'Green' },
    });
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    const { page } = await pageOf(player);
    await page.goto(`/join/${code}`);
    await page.getByLabel('Yes, my choices may be used for research').check();
    await page.getByRole('button', { name: 'I have read this — continue' }).click();
    await page.getByRole('heading', { name: 'Three questions before you play' }).waitFor();
    expect(page.url()).toContain(`/join/${code}/check`);
    await page.screenshot({ path: path.join(SHOTS, 'check-phone.png'), fullPage: true });

    // Wrong on the first question (R instead of T), right on the others.
    const q1 = page.getByTestId('question-points-dc');
    expect(await q1.textContent()).toContain('If you choose Green and your partner chooses Blue');
    await q1.getByLabel('40 points').check();
    await page.getByTestId('question-points-cd').getByLabel('12 points').check();
    await page.getByTestId('question-draw').getByLabel('80%').check();
    await page.getByRole('button', { name: 'Check my answers and join' }).click();
    await page.getByText('One answer is not right yet').waitFor();
    // Source: common practice — choosing D against C pays T (50), the partner S (12).
    expect(await q1.textContent()).toContain('you get 50 points');
    expect(await page.getByTestId('question-draw').textContent()).not.toContain('Not quite');
    expect(page.url()).toContain('/check');
    await page.screenshot({ path: path.join(SHOTS, 'check-wrong-phone.png'), fullPage: true });

    // The Conductor lists the participant as not yet passed, with the attempt and the question.
    const { page: conductor } = await pageOf(instructor, DESKTOP);
    await conductor.goto(`/courses/${courseId}/sessions/${sessionId}`);
    const status = conductor.getByTestId('comprehension-status');
    await expect.poll(() => status.textContent()).toContain('0 passed · 1 not yet');
    expect(await status.textContent()).toContain('Player One');
    expect(await status.textContent()).toContain('1 attempt, not yet passed — last wrong: question 1 (points table)');
    await conductor.screenshot({ path: path.join(SHOTS, 'conductor-desktop.png'), fullPage: true });

    await q1.getByLabel('50 points').check();
    await page.getByRole('button', { name: 'Check my answers and join' }).click();
    await page.getByRole('heading', { name: 'You are in' }).waitFor();
    expect(page.url()).toContain(`/play/${sessionId}`);
    const [row] = await testDb().select().from(comprehensionAttempts).where(eq(comprehensionAttempts.sessionId, sessionId));
    expect(row).toMatchObject({ userId: playerId, attempts: 2, lastWrong: null });
    expect(row.passedAt).not.toBeNull();
    const [joined] = await testDb().select().from(sessionParticipants).where(eq(sessionParticipants.sessionId, sessionId));
    expect(joined.consent).toBe(1);
    await expect.poll(() => status.textContent(), { timeout: 12_000 }).toContain('1 passed · 0 not yet');
    expect(pageErrors.splice(0)).toEqual([]);
  });

  it('offers a practice supergame against the computer that sends and stores nothing', async () => {
    const { courseId, designId, instructor, player } = await courseWith({
      practice: true,
      delta: 0.5,
      oddCount: { kind: 'computer', strategy: 'TFT' },
    });
    const { sessionId, code } = await openSession(instructor, courseId, designId);
    const { page } = await pageOf(player);
    await page.goto(`/join/${code}`);
    await page.getByRole('button', { name: 'I have read this — continue' }).click();
    await page.getByTestId('practice-label').waitFor();
    expect(await page.getByTestId('practice-label').textContent()).toBe('Practice — not recorded');
    // the practice partner is described in the same plain words as a real computer partner (app/lib/strategy-words.ts)
    expect(await bodyText(page)).toContain('a computer that starts with X and then copies what you did last round');
    // From here until the join button, the phone sends nothing.
    const sent: string[] = [];
    page.on('request', (r) => sent.push(`${r.method()} ${r.url()}`));
    const x = page.getByRole('button', { name: 'X', exact: true });
    const y = page.getByRole('button', { name: 'Y', exact: true });
    await expect.poll(() => y.isEnabled()).toBe(true);
    await y.click();
    const rounds = page.getByTestId('practice-rounds');
    await rounds.getByText('Practice round 1').waitFor();
    // Source: common practice (tit-for-tat opens with C); Y against X pays T = 50, the computer S = 12.
    expect(await rounds.textContent()).toContain('Practice round 1: you ● Y, computer ◆ X → you would get 50, the computer 12.');
    expect(await rounds.textContent()).toMatch(/Draw \d+ (≤ 50 — another round|> 50 — the supergame ends)/);
    for (let n = 2; await x.isVisible(); n++) {
      await x.click();
      await rounds.getByText(`Practice round ${n}:`).waitFor();
    }
    await page.getByText('Practice over.').waitFor();
    await page.screenshot({ path: path.join(SHOTS, 'practice-phone.png'), fullPage: true });
    expect(sent).toEqual([]);
    await page.getByRole('button', { name: 'Done practising — join the session' }).click();
    await page.getByRole('heading', { name: 'You are in' }).waitFor();
    const [{ n }] = await testDb().select({ n: count() }).from(choices).where(eq(choices.sessionId, sessionId));
    expect(n).toBe(0);
    expect(pageErrors.splice(0)).toEqual([]);
  });
});

describe('instruction templates', () => {
  it('fill the template with the parameters after δ changes, in the preview and on the phone', async () => {
    const { courseId, instructor, player } = await courseWith({});
    const { page } = await pageOf(instructor, DESKTOP);
    await page.goto(`/courses/${courseId}/designs/new`);
    await page.getByLabel('Name', { exact: true }).fill('Templated');
    await page
      .getByLabel('Instructions participants read')
      .fill('Both {C}: {R} points each. After each round another round follows with a chance of {delta%}.');
    const delta = page.getByLabel('δ (chance of another round)');
    await delta.fill('0.5');
    const preview = page.getByTestId('phone-preview');
    await preview.getByText('All the rules, in full').click();
    await expect
      .poll(() => preview.getByTestId('instructions').textContent())
      .toBe('Both X: 40 points each. After each round another round follows with a chance of 50%.');
    await delta.fill('0.9');
    await expect.poll(() => preview.getByTestId('instructions').textContent()).toContain('a chance of 90%.');
    expect(await page.getByTestId('instruction-contradictions').count()).toBe(0);
    await page.screenshot({ path: path.join(SHOTS, 'editor-desktop.png'), fullPage: true });
    await preview.getByRole('tab', { name: 'Play screen' }).click();
    await preview.getByText('Supergame 1 · Round 1').waitFor();
    await preview.screenshot({ path: path.join(SHOTS, 'preview-play-desktop.png') });
    await page.getByRole('button', { name: 'Create design' }).click();
    await expect.poll(() => page.url()).toContain('saved=1');
    const designId = Number(/designs\/(\d+)/.exec(page.url())![1]);
    const { code } = await openSession(instructor, courseId, designId);
    const { page: phone } = await pageOf(player);
    await phone.goto(`/join/${code}`);
    expect(await phone.getByTestId('instructions').textContent()).toBe(
      'Both X: 40 points each. After each round another round follows with a chance of 90%.',
    );
    expect(pageErrors.splice(0)).toEqual([]);
  });

  it('refuses to open a session whose hand-written instructions contradict its design', async () => {
    const text = 'After each round there is a 75 % chance of another round.';
    const { courseId, designId, instructor } = await courseWith({ delta: 0.5, instructions: text });
    const { page } = await pageOf(instructor, DESKTOP);
    await page.goto(`/courses/${courseId}/designs/${designId}`);
    await expect.poll(() => page.getByTestId('instruction-contradictions').textContent()).toContain('“75 %”, but δ = 0.5');
    await page.goto(`/courses/${courseId}/sessions`);
    await page.getByLabel('Design').selectOption(String(designId));
    await page.getByRole('button', { name: 'Open session' }).click();
    const error = page.locator('#designId-error, [id$="designId-error"]').or(page.getByText('do not match its parameters'));
    await error.first().waitFor();
    expect(await error.first().textContent()).toContain('The instructions say “75 %”, but δ = 0.5');
    expect(page.url()).toMatch(/\/sessions$/);
    await page.screenshot({ path: path.join(SHOTS, 'open-refused-desktop.png'), fullPage: true });
    const res = await instructor.post(`/courses/${courseId}/sessions`, { designId, admission: 'roster', seed: '', emailDomain: '' });
    expect(res.status).toBe(400);
    expect(pageErrors.splice(0)).toEqual([]);
  });
});
