import fs from 'node:fs';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, launch, pageErrors, PHONE, SIZES, signedInPage } from '#tests/helpers/browser';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { uniqueEmail } from '#tests/helpers/http';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

// Screenshots to look at after a run (not compared by the test).
const SHOTS = path.resolve('.data/test/screenshots');

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
  fs.mkdirSync(SHOTS, { recursive: true });
});
afterAll(async () => {
  await browser?.close();
});

describe('Debrief, in Chromium', () => {
  it('the demo’s two completed sessions side by side, an estimation with a bootstrap run from the page, then projector mode', async () => {
    const page = await signedInPage(browser, 'm.achterberg@halvorsen.example', DESKTOP);
    await page.getByRole('link', { name: 'ECON 214 Strategy and Markets' }).click();
    await page.getByRole('link', { name: 'Debrief' }).click();
    await page.getByRole('checkbox', { name: /Short horizon/ }).check();
    await page.getByRole('checkbox', { name: /Long horizon/ }).check();
    await page.getByRole('button', { name: 'Compare the ticked sessions' }).click();
    await expect.poll(() => page.getByRole('heading', { name: 'Debrief: sessions side by side' }).isVisible()).toBe(true);

    // Both treatments in the table and in every chart's legend; each chart has its CSV link.
    const table = page.getByRole('table', { name: 'Cooperation and strategy shares per treatment' });
    await expect.poll(() => table.getByRole('row').count()).toBe(3);
    const coop = page.locator('figure[data-chart="cooperation-by-supergame"]');
    await expect.poll(() => coop.locator('.recharts-legend-wrapper li').count()).toBe(4);
    expect(await coop.textContent()).toContain('Short horizon');
    expect(await coop.textContent()).toContain('Long horizon');
    expect(await page.getByRole('link', { name: /download data \(CSV\)/ }).count()).toBe(6);

    // An estimation with a bootstrap: the progress bar shows while it runs and reaches B.
    await page.getByLabel('Bootstrap replicates (B)').fill('200');
    await page.getByLabel('Seed', { exact: true }).fill('2027');
    await page.getByRole('button', { name: 'Run estimation' }).click();
    const progress = page.getByTestId('estimate-progress');
    await expect.poll(() => page.getByRole('progressbar', { name: 'Bootstrap replicates done' }).isVisible()).toBe(true);
    await expect.poll(() => progress.getAttribute('data-status'), { timeout: 30_000 }).toBe('done');
    // two treatments × B = 200 replicates
    expect(await progress.textContent()).toContain('400 of 400 bootstrap replicates (100 %)');
    await expect.poll(() => page.getByTestId('estimate-results').isVisible()).toBe(true);
    await expect.poll(() => table.getByRole('columnheader', { name: 'TFT' }).isVisible()).toBe(true);
    await page.screenshot({ path: path.join(SHOTS, 'debrief-compare-desktop.png'), fullPage: true });

    // Projector mode: one chart at a time, ← / → between them, the estimate's chart included.
    await page.getByRole('link', { name: 'Projector mode' }).click();
    await expect.poll(() => page.getByRole('heading', { name: 'Cooperation by supergame' }).isVisible()).toBe(true);
    expect(await page.getByRole('navigation', { name: 'Charts' }).textContent()).toContain('1 / 7');
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => page.getByRole('heading', { name: 'Cooperation by round within the supergame' }).isVisible()).toBe(true);
    await page.keyboard.press('ArrowLeft');
    await page.keyboard.press('ArrowLeft');
    await expect.poll(() => page.getByRole('heading', { name: 'Estimated strategy shares' }).isVisible()).toBe(true);
    await page.screenshot({ path: path.join(SHOTS, 'debrief-projector.png') });
    expect(pageErrors).toEqual([]);
  });

  it('the switch for timeout-filled, computer-seat and unpaid rounds, and captions that say what is included (desktop and phone)', async () => {
    for (const [size, email] of [
      [DESKTOP, 'm.achterberg@halvorsen.example'],
      [PHONE, 'r.okafor@halvorsen.example'],
    ] as const) {
      const page = await signedInPage(browser, email, size);
      // the demo course is course 1 (seeded first)
      await page.goto('/courses/1/debrief');
      await page.getByRole('link', { name: /Short horizon/ }).click();
      await expect.poll(() => page.getByRole('heading', { name: /^Debrief: .*Short horizon/ }).isVisible()).toBe(true);

      // Off by default: every cooperation caption says which choices it counts and what it left out.
      const sw = page.getByRole('checkbox', {
        name: /Include timeout-filled and computer-seat choices, and rounds after a supergame’s end/,
      });
      expect(await sw.isChecked()).toBe(false);
      const caption = (chart: string) => page.locator(`figure[data-chart="${chart}"] figcaption`).textContent();
      for (const chart of ['cooperation-by-supergame', 'cooperation-by-round', 'outcomes', 'theory'])
        expect(await caption(chart)).toMatch(/Own choices in rounds that count: [\d,]+\./);
      expect(await caption('lengths')).not.toMatch(/methods\.md|§/);
      expect(await caption('points')).toContain('whoever chose');
      const csv = page.locator('figure[data-chart="cooperation-by-supergame"]').getByRole('link', { name: /download data \(CSV\)/ });
      expect(await csv.getAttribute('href')).not.toContain('include=');
      expect(await page.locator('input[type="hidden"][name="include"]').getAttribute('value')).toBe('own');
      if (size === PHONE) await page.screenshot({ path: path.join(SHOTS, 'debrief-switch-phone.png'), fullPage: false });

      // On: every origin, in the captions, the CSV links, the estimation request and the URL.
      await sw.check();
      await expect.poll(() => page.url()).toContain('include=all');
      await expect.poll(() => caption('cooperation-by-supergame')).toMatch(/All choices: [\d,]+/);
      expect(await sw.isChecked()).toBe(true);
      expect(await csv.getAttribute('href')).toContain('include=all');
      expect(await page.locator('input[type="hidden"][name="include"]').getAttribute('value')).toBe('all');
      expect(await page.getByTestId('estimate-include').textContent()).toContain('Uses every choice');
      await page.screenshot({
        path: path.join(SHOTS, `debrief-switch-${size === PHONE ? 'phone' : 'desktop'}-on.png`),
        fullPage: size !== PHONE,
      });

      // Off again: back to own, paid choices.
      await sw.uncheck();
      await expect.poll(() => page.url()).not.toContain('include=all');
      await expect.poll(() => caption('cooperation-by-supergame')).toMatch(/Own choices in rounds that count/);
    }
    expect(pageErrors).toEqual([]);
  });
});

describe('treatments on the side-by-side Debrief, in Chromium', () => {
  const removers: (() => Promise<void>)[] = [];
  afterAll(async () => {
    for (const r of removers) await r();
    await closeTestDb();
  });

  it('each payoff set has its own sizeBAD curve; same-named sessions of different treatments are refused, then shown apart on request', async () => {
    const email = uniqueEmail('e2e-treat');
    const userId = await createUser(email);
    const courseId = await createCourse('Treatments lab', [{ userId, role: 'instructor' }]);
    // Payoffs of Dal Bó & Fréchette (2011) with R = 40 and R = 32 (methods.md §1 table).
    const make = async (treatment: string, R: number, delta: number, seed: number) => {
      const s = await insertSyntheticSession(testDb(), {
        courseId,
        createdBy: userId,
        participants: 4,
        lengths: [2, 3, 1, 4],
        design: { delta, payoffs: { R, S: 12, T: 50, P: 25 } },
        treatment,
        seed,
      });
      removers.push(s.remove);
      return s.sessionId;
    };
    const high = await make('High reward', 40, 0.75, 21);
    const low = await make('Low reward', 32, 0.75, 22);
    const again = await make('High reward', 40, 0.5, 23);

    for (const [viewport, name] of SIZES) {
      const page = await signedInPage(browser, email, viewport);
      await page.goto(`/courses/${courseId}/debrief/compare?sessions=${high},${low}`);
      const theory = page.locator('figure[data-chart="theory"]');
      await expect.poll(() => theory.locator('.recharts-line').count()).toBe(2);
      const legend = await theory.locator('.recharts-legend-wrapper').textContent();
      expect(legend).toContain(`sizeBAD at R40 S12 T50 P25 (#${high})`);
      expect(legend).toContain(`sizeBAD at R32 S12 T50 P25 (#${low})`);
      // each group with its own δ and sizeBAD: 13/48 and 13/16 at δ = 3/4 (methods.md §1)
      const table = page.getByRole('table', { name: 'Cooperation and strategy shares per treatment' });
      await expect.poll(() => table.getByRole('row').count()).toBe(3);
      expect(await table.getByRole('row').nth(1).textContent()).toContain('0.271');
      expect(await table.getByRole('row').nth(2).textContent()).toContain('0.813');
      await theory.scrollIntoViewIfNeeded();
      await page.screenshot({ path: path.join(SHOTS, `debrief-treatments-${name}.png`), fullPage: true });

      await page.goto(`/courses/${courseId}/debrief/compare?sessions=${high},${again}`);
      await expect.poll(() => page.getByText('These sessions cannot be pooled').isVisible()).toBe(true);
      await page.screenshot({ path: path.join(SHOTS, `debrief-refused-${name}.png`), fullPage: true });
      await page.getByRole('link', { name: 'Show them as separate treatments' }).click();
      await expect.poll(() => page.getByText('shown as separate treatments', { exact: false }).isVisible()).toBe(true);
      await expect.poll(() => table.getByRole('row').count()).toBe(3);
      expect(await table.getByRole('row').nth(1).textContent()).toContain('δ = 0.75');
      expect(await table.getByRole('row').nth(2).textContent()).toContain('δ = 0.5');
      await page.context().close();
    }
    expect(pageErrors).toEqual([]);
  });
});
