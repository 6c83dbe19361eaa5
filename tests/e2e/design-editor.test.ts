import fs from 'node:fs';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { designSchema } from '#app/lib/design';
import { designs, sessions } from '#drizzle/schema';
import { DESKTOP, launch, pageErrors, SIZES, signedInPage } from '#tests/helpers/browser';
import { closeTestDb, createCourse, createCourseCreator, createUser, testDb } from '#tests/helpers/db';
import { uniqueEmail } from '#tests/helpers/http';

// Screenshots to look at after a run (not compared by the test).
const SHOTS = path.resolve('.data/test/screenshots');

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
  fs.mkdirSync(SHOTS, { recursive: true });
});
afterAll(async () => {
  await browser?.close();
  await closeTestDb();
});

const verdict = (page: Page, condition: string) =>
  page.getByTestId('verdicts').getByRole('row').filter({ hasText: condition }).getAttribute('data-verdict');

describe('design editor, in Chromium', () => {
  it('an instructor creates a design, sees verdicts flip at the thresholds, builds and saves an automaton', async () => {
    const designer = uniqueEmail('designer');
    await createCourseCreator(designer);
    const page = await signedInPage(browser, designer, DESKTOP);
    await page.goto('/courses/new');
    await page.getByLabel('Title').fill('Repeated games lab');
    await page.getByRole('button', { name: 'Create course' }).click();
    await page.getByRole('link', { name: 'Designs' }).click();
    await page.getByRole('link', { name: 'New design' }).click();

    await page.getByLabel('Name').fill('High temptation');
    // T=50, R=40, P=25, S=12: grim is SPE from (T−R)/(T−P) = 0.4, grim risk-dominates from
    // (T−R+P−S)/(T−S) = 23/38 ≈ 0.605. Source: methods.md §1 formulas (Friedman 1971; Blonski,
    // Ockenfels & Spagnolo 2011).
    const delta = page.getByLabel('δ (chance of another round)');
    await delta.fill('0.3');
    await expect.poll(() => verdict(page, 'Grim trigger is subgame perfect')).toBe('no');
    await delta.fill('0.45');
    await expect.poll(() => verdict(page, 'Grim trigger is subgame perfect')).toBe('yes');
    expect(await verdict(page, 'Grim risk-dominates always-defect')).toBe('no');
    await delta.fill('0.65');
    await expect.poll(() => verdict(page, 'Grim risk-dominates always-defect')).toBe('yes');
    await expect.poll(() => page.getByTestId('planner').textContent()).toContain('20 supergames at δ = 0.65');

    // A custom automaton: cooperate, punish a defection for one round, then forgive.
    await page.getByLabel('Strategy', { exact: true }).selectOption('__new__');
    await page.getByLabel('Short name').fill('Punish1');
    await page.getByLabel('Description').fill('Punish once, then forgive');
    await page.getByRole('button', { name: 'Add a state' }).click();
    await page.getByLabel('State 2 plays').selectOption('D');
    await page.getByLabel('State 1, next after (C, D)').selectOption('2');
    await page.getByLabel('State 1, next after (D, D)').selectOption('2');
    await page.getByLabel('State 2, next after (C, C)').selectOption('1');
    await page.getByLabel('State 2, next after (C, D)').selectOption('1');
    await page.getByLabel('State 2, next after (D, C)').selectOption('1');
    await page.getByLabel('State 2, next after (D, D)').selectOption('1');
    // [calc] always-defect against it earns T, P, T, P, …: (T + δP)/(1 − δ²) ≤ R/(1 − δ) iff
    // δ ≥ (T − R)/(R − P) = 10/15 = 2/3 (one-shot deviation, methods.md §4).
    await expect.poll(() => page.getByTestId('nash-intervals').textContent()).toBe('[0.6667, 1)');
    await page.getByRole('button', { name: 'Save to this course' }).click();
    await expect.poll(() => page.getByText('Punish1 saved').isVisible()).toBe(true);

    await page.getByRole('button', { name: 'Create design' }).click();
    await expect.poll(() => page.getByText('Design saved.').isVisible()).toBe(true);
    await expect.poll(() => page.getByRole('heading', { name: 'High temptation' }).isVisible()).toBe(true);
    // The saved strategy is now in the course's list of the checker.
    expect(await page.getByLabel('Strategy', { exact: true }).locator('option', { hasText: 'Punish1' }).count()).toBe(1);
    expect(pageErrors).toEqual([]);
  });
});

describe('a design used by a session, in Chromium', () => {
  it('is read-only with the reason shown; "Make a new version" opens an editable v2, whose theory panel names the δ_RD tie', async () => {
    const email = uniqueEmail('e2e-versions');
    const userId = await createUser(email);
    const courseId = await createCourse('Versions lab', [{ userId, role: 'instructor' }]);
    const params = designSchema.parse({ payoffs: { R: 40, S: 12, T: 50, P: 25 }, delta: 0.75, supergames: 10, roundSeconds: 20 });
    const [d] = await testDb().insert(designs).values({ courseId, name: 'Class run', params, createdBy: userId });
    await testDb()
      .insert(sessions)
      .values({ courseId, designId: d.insertId, treatment: 'Class run', params, seed: 5, status: 'complete', createdBy: userId });

    for (const [viewport, name] of SIZES) {
      const page = await signedInPage(browser, email, viewport);
      await page.goto(`/courses/${courseId}/designs/${d.insertId}`);
      await expect.poll(() => page.getByText('Read-only: used by a session').isVisible()).toBe(true);
      expect(await page.getByTestId('read-only-reason').textContent()).toContain(
        'A session was opened from this design, so it stays exactly as they ran it',
      );
      expect(await page.getByLabel('δ (chance of another round)').isDisabled()).toBe(true);
      expect(await page.getByRole('button', { name: 'Save design' }).count()).toBe(0);
      await page.screenshot({ path: path.join(SHOTS, `design-read-only-${name}.png`), fullPage: true });
      await page.context().close();
    }

    const page = await signedInPage(browser, email);
    await page.goto(`/courses/${courseId}/designs/${d.insertId}`);
    await page.getByRole('button', { name: 'Make a new version' }).click();
    await expect.poll(() => page.getByTestId('design-version').textContent()).toBe('v2 of Class run (v1)');
    expect(await page.getByLabel('δ (chance of another round)').isDisabled()).toBe(false);

    // Axelrod's payoffs T=5, R=3, P=1, S=0: δ_RD = 3/5, where sizeBAD is exactly ½ (methods.md §1 [calc]).
    for (const [f, v] of [
      ['T', '5'],
      ['R', '3'],
      ['P', '1'],
      ['S', '0'],
    ] as const)
      await page.locator(`#payoffs-${f}`).fill(v);
    await page.getByLabel('δ (chance of another round)').fill('0.6');
    await expect.poll(() => verdict(page, 'Grim risk-dominates always-defect')).toBe('tie');
    expect(await page.locator('[data-basin]').textContent()).toBe('exactly ½: neither favoured');
    await page.getByRole('button', { name: 'Save design' }).click();
    await expect.poll(() => page.getByText('Design saved.').isVisible()).toBe(true);
    const [old] = await testDb().select().from(designs).where(eq(designs.id, d.insertId));
    expect((old.params as { delta: number }).delta).toBe(0.75);
    expect(pageErrors).toEqual([]);
  });
});
