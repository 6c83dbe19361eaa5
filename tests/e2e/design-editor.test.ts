import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, launch, newContext, pageErrors, signInInBrowser } from '#tests/helpers/browser';
import { closeTestDb, createCourseCreator } from '#tests/helpers/db';
import { uniqueEmail } from '#tests/helpers/http';

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
  await closeTestDb();
});

const verdict = (page: Page, condition: string) =>
  page.getByTestId('verdicts').getByRole('row').filter({ hasText: condition }).getAttribute('data-verdict');

describe('design editor, in Chromium', () => {
  it('an instructor creates a design, sees verdicts flip at the thresholds, builds and saves an automaton', async () => {
    const page = await (await newContext(browser, DESKTOP)).newPage();
    const designer = uniqueEmail('designer');
    await createCourseCreator(designer);
    await page.goto('/sign-in');
    await signInInBrowser(page, designer);
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
