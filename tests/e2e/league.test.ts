// A strategy league from end to end in Chromium, in the demo course: three participants on
// phone-sized screens enter strategies (one a library strategy changed, one built from blank, one
// a library strategy as it is), the instructor closes and runs the league on the staff page, the
// ranking and the evolution show to staff and, once published, to the participants (their own
// entry marked), the results page sets the league beside a demo session's strategy estimate, and
// the big-screen reveal steps through the ranking from the bottom. Screenshots of every league
// page at 390 and 1440 px go to .data/test/screenshots.
import fs from 'node:fs';
import path from 'node:path';
import { and, eq } from 'drizzle-orm';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type Automaton, libraryStrategy } from '#app/lib/automata';
import { roundRobin, standings } from '#app/lib/league';
import { AXELROD_PAYOFFS, type LeagueDesign } from '#app/lib/league-design';
import { createLeague } from '#app/models/league.server';
import { closeDb } from '#app/utils/db.server';
import { sessions, users } from '#drizzle/schema';
import { DESKTOP, launch, pageAs, pageErrors, PHONE, signedInPage } from '#tests/helpers/browser';
import { closeTestDb, testDb } from '#tests/helpers/db';
import { waitEstimate } from '#tests/helpers/estimates';
import { signIn } from '#tests/helpers/http';

const SHOTS = path.resolve('.data/test/screenshots');
const DEMO_COURSE = 1;
const INSTRUCTOR = 'r.okafor@halvorsen.example';
// Students 31–33 of the invented demo roster (other e2e files use the first ones).
const STUDENTS = ['student31@halvorsen.example', 'student32@halvorsen.example', 'student33@halvorsen.example'];
const design: LeagueDesign = { payoffs: { ...AXELROD_PAYOFFS }, delta: 0.9, epsilon: 0, matches: 0, generations: 100, seed: 11 };

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
  fs.mkdirSync(SHOTS, { recursive: true });
});
afterAll(async () => {
  await browser?.close();
  await closeTestDb();
  await closeDb();
});

const shot = (page: Page, name: string) => page.screenshot({ path: path.join(SHOTS, `league-${name}.png`), fullPage: true });

/** The participant opens the league from their home page and lands on its editor. */
async function openFromHome(page: Page, title: string) {
  await page.goto('/');
  const card = page.getByTestId('my-leagues').getByRole('listitem').filter({ hasText: title });
  await card.getByRole('link', { name: 'Enter your strategy' }).click();
  await expect.poll(() => page.getByRole('heading', { name: title }).isVisible()).toBe(true);
}

async function save(page: Page, name: string) {
  await page.getByLabel("Your entry's name").fill(name);
  await page.getByRole('button', { name: /Enter this strategy|Save changes/ }).click();
  await expect.poll(() => page.getByText('Entry saved').isVisible()).toBe(true);
}

describe('a strategy league, in Chromium', () => {
  it('three phones enter, the instructor runs and publishes, results, comparison and reveal show', { timeout: 240_000 }, async () => {
    const [inst] = await testDb().select({ id: users.id }).from(users).where(eq(users.email, INSTRUCTOR));
    const title = `Week 6 league ${Date.now().toString(36)}`;
    const league = await createLeague(DEMO_COURSE, inst.id, { title, design, deadline: new Date(Date.now() + 3_600_000) });
    const base = `/courses/${DEMO_COURSE}/leagues/${league.id}`;

    // A demo session's strategy-frequency estimate, started as the Debrief starts one.
    const [demo] = await testDb()
      .select({ id: sessions.id })
      .from(sessions)
      .where(and(eq(sessions.courseId, DEMO_COURSE), eq(sessions.status, 'complete')))
      .limit(1);
    const instructor = await signIn(INSTRUCTOR);
    const started = await instructor.post(`/courses/${DEMO_COURSE}/estimates`, {
      sessions: String(demo.id),
      windowKind: 'all',
      preset: 'dbf2011',
      bootstrap: 0,
      seed: 5,
    });
    expect([200, 202]).toContain(started.status);
    const { estimate } = (await started.json()) as { estimate: { id: number } };

    // Phone 1: Tit-for-tat, changed to forgive a defection it answered (after (D, D) back to state 1).
    const p1 = await signedInPage(browser, STUDENTS[0], PHONE);
    await openFromHome(p1, title);
    await shot(p1, 'entry-start-phone');
    await p1.getByRole('button', { name: /Tit-for-tat · TFT/ }).click();
    await p1.getByLabel('State 2, next after (D, D)').selectOption({ value: '0' });
    await expect.poll(() => p1.getByTestId('strategy-preview').isVisible()).toBe(true);
    // Against ALLD it no longer keeps defecting: C D C D … Source: the edit just made (after D,D → state 1).
    expect(
      await p1
        .getByRole('row', { name: /vs ALLD/ })
        .getByLabel(/^yours:/)
        .getAttribute('aria-label'),
    ).toBe('yours: C D C D C D C D');
    await shot(p1, 'entry-edited-phone');
    await save(p1, 'Forgiving copycat');
    // Every control on the editor is at least 44 px tall (WCAG 2.5.5 target size).
    const small = await p1
      .locator('[data-testid=league-entry-editor] select, [data-testid=league-entry-editor] button')
      .evaluateAll((els) => els.filter((e) => e.getBoundingClientRect().height < 44 && e.getBoundingClientRect().height > 0).length);
    expect(small).toBe(0);
    // Nothing sideways at 390 px.
    expect(await p1.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await shot(p1, 'entry-saved-phone');

    // Phone 2: from blank, a grim trigger built by hand (state 2 plays D for good).
    const p2 = await signedInPage(browser, STUDENTS[1], PHONE);
    await openFromHome(p2, title);
    await p2.getByRole('button', { name: /^Blank/ }).click();
    await p2.getByRole('button', { name: 'Add a state' }).click();
    await expect.poll(() => p2.getByTestId('state-2-issues').textContent()).toContain('cannot be reached');
    await shot(p2, 'entry-problem-phone');
    for (const p of ['(C, D)', '(D, C)', '(D, D)']) await p2.getByLabel(`State 1, next after ${p}`).selectOption({ value: '1' });
    await expect.poll(() => p2.getByTestId('state-2-issues').count()).toBe(0);
    await expect.poll(() => p2.getByTestId('entry-words').textContent()).toContain('for the rest of the supergame');
    await save(p2, 'Handmade grudge');

    // Phone 3: Always defect as it is.
    const p3 = await signedInPage(browser, STUDENTS[2], PHONE);
    await openFromHome(p3, title);
    await p3.getByRole('button', { name: /Always defect · ALLD/ }).click();
    await save(p3, 'Hawk');

    // The instructor closes entries and runs the league on the staff page.
    const staff = await pageAs(browser, instructor, base, DESKTOP);
    await staff.getByRole('button', { name: 'Close entries' }).click();
    await expect.poll(() => staff.getByRole('button', { name: 'Run the league' }).isVisible()).toBe(true);
    await staff.getByRole('button', { name: 'Run the league' }).click();
    await expect.poll(() => staff.getByTestId('league-run-status').getAttribute('data-status'), { timeout: 60_000 }).toBe('done');
    await staff.reload();
    // The staff page links to the reveal.
    expect(await staff.getByRole('link', { name: 'Reveal on the big screen' }).getAttribute('href')).toBe(`${base}/reveal`);

    // The phone now says entries are closed (the editor is gone).
    await p1.reload();
    await expect.poll(() => p1.getByText('Entries are closed').isVisible()).toBe(true);

    // The expected ranking, from the league's own numbers (app/lib/league.ts has its checks).
    const automata: Automaton[] = [
      { ...libraryStrategy('TFT'), states: [libraryStrategy('TFT').states[0], { action: 'D', next: { cc: 0, cd: 1, dc: 0, dd: 0 } }] },
      libraryStrategy('Grim'),
      libraryStrategy('ALLD'),
    ];
    const names = ['Forgiving copycat', 'Handmade grudge', 'Hawk'];
    const expected = standings(roundRobin(automata, { game: design.payoffs, delta: design.delta, epsilon: design.epsilon })).map((s) => ({
      name: names[s.entry],
      rank: s.rank,
      score: s.score.toFixed(2),
    }));

    // Staff results: the ranking, the evolution, and the class beside the league.
    expect((await waitEstimate(instructor, DEMO_COURSE, estimate.id)).status).toBe('done');
    const results = await pageAs(browser, instructor, `${base}/results?session=${demo.id}`, DESKTOP);
    await expect.poll(() => results.getByTestId('league-comparison').isVisible()).toBe(true);
    for (const e of expected) expect(await results.textContent('body')).toContain(e.name);
    await shot(results, 'results-desktop');
    // Kept with the league, the comparison becomes the reveal's last slide.
    await results.getByRole('button', { name: 'Keep this comparison with the league' }).click();
    await expect.poll(() => results.getByText('This comparison is kept with the league.').isVisible()).toBe(true);
    const resultsPhone = await pageAs(browser, instructor, `${base}/results?session=${demo.id}`, PHONE);
    await expect.poll(() => resultsPhone.getByTestId('league-comparison').isVisible()).toBe(true);
    await shot(resultsPhone, 'results-phone');

    // The big-screen reveal: title, then one entry per key from the bottom, then the evolution.
    const reveal = await pageAs(browser, instructor, `${base}/reveal`, DESKTOP);
    await expect.poll(() => reveal.getByRole('heading', { name: title }).isVisible()).toBe(true);
    await shot(reveal, 'reveal-title-desktop');
    for (let k = 1; k <= expected.length; k++) {
      await reveal.keyboard.press('ArrowRight');
      await expect.poll(() => reveal.getByTestId('reveal-row').count()).toBe(k);
      const top = await reveal.getByTestId('reveal-row').first().textContent();
      const e = expected[expected.length - k];
      expect(top).toContain(e.name);
      expect(top).toContain(e.score);
      if (k === 1) await shot(reveal, 'reveal-last-place-desktop');
    }
    await shot(reveal, 'reveal-ranking-desktop');
    await reveal.keyboard.press('ArrowRight');
    await expect.poll(() => reveal.locator('[data-testid=evolution-chart] .recharts-line').count()).toBeGreaterThan(0);
    expect(await reveal.textContent('body')).toContain('Still there at the end');
    expect(await reveal.textContent('body')).not.toContain('@halvorsen.example');
    await shot(reveal, 'reveal-evolution-desktop');
    await reveal.keyboard.press('ArrowRight');
    await expect.poll(() => reveal.getByTestId('reveal-class').isVisible()).toBe(true);
    expect(await reveal.getByTestId('reveal-class').textContent()).toContain(`session ${demo.id}`);
    for (const name of names) expect(await reveal.getByTestId('reveal-class').textContent()).toContain(name);
    await shot(reveal, 'reveal-class-desktop');
    const revealPhone = await pageAs(browser, instructor, `${base}/reveal`, PHONE);
    await revealPhone.getByRole('button', { name: /Next/ }).click();
    await revealPhone.getByRole('button', { name: /Next/ }).click();
    await expect.poll(() => revealPhone.getByTestId('reveal-row').count()).toBe(2);
    await shot(revealPhone, 'reveal-phone');

    // Published: each participant sees the ranking with their own entry marked, and the evolution.
    await staff.getByRole('button', { name: 'Publish results' }).click();
    await expect.poll(() => staff.getByRole('button', { name: 'Publish results' }).count()).toBe(0);
    for (const [page, name] of [
      [p1, names[0]],
      [p2, names[1]],
    ] as const) {
      await page.goto('/');
      await page
        .getByTestId('my-leagues')
        .getByRole('listitem')
        .filter({ hasText: title })
        .getByRole('link', { name: 'See the results' })
        .click();
      await expect.poll(() => page.getByTestId('own-rank').isVisible()).toBe(true);
      const mine = expected.find((e) => e.name === name)!;
      expect(await page.getByTestId('own-rank').textContent()).toContain(`ranked ${mine.rank} of 3, with ${mine.score} points per round`);
      expect(await page.locator('[data-testid=ranking] li[aria-current=true]').textContent()).toContain(name);
      expect(await page.getByTestId('ranking').getByRole('listitem').allTextContents()).toEqual(
        expected.map((e) => expect.stringContaining(e.name)),
      );
      await expect.poll(() => page.locator('[data-testid=evolution-chart] .recharts-line').count()).toBeGreaterThan(0);
    }
    await shot(p1, 'results-participant-phone');
    const p1Desktop = await signedInPage(browser, STUDENTS[0], DESKTOP);
    await p1Desktop.goto(`/play/leagues/${league.id}`);
    await expect.poll(() => p1Desktop.getByTestId('own-rank').isVisible()).toBe(true);
    await shot(p1Desktop, 'results-participant-desktop');
    // The editor at 1440 px (a fresh league, open): what a participant on a laptop sees.
    const open = await createLeague(DEMO_COURSE, inst.id, { title: `${title} (second)`, design, deadline: null });
    await p1Desktop.goto(`/play/leagues/${open.id}`);
    await p1Desktop.getByRole('button', { name: /Win-stay, lose-shift/ }).click();
    await shot(p1Desktop, 'entry-desktop');
    await p1Desktop.goto('/');
    await shot(p1Desktop, 'home-desktop');
    await p3.goto('/');
    await shot(p3, 'home-phone');
    expect(pageErrors).toEqual([]);
  });
});
