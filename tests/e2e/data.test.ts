import fs from 'node:fs/promises';
import path from 'node:path';
import Papa from 'papaparse';
import type { Browser, Download, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PANEL_COLUMNS } from '#app/lib/panel-codebook';
import { courseMembers } from '#drizzle/schema';
import { DESKTOP, launch, newContext, pageErrors, signInInBrowser } from '#tests/helpers/browser';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { uniqueEmail } from '#tests/helpers/http';

let browser: Browser;
let page: Page;
let courseId: number;
let email: string;
const DEMO_COURSE = 1;

beforeAll(async () => {
  browser = await launch();
  // A fresh instructor of a new course, and of the demo course (its completed sessions).
  email = uniqueEmail('instr');
  const userId = await createUser(email, 'E2E Instructor');
  courseId = await createCourse('ECON 301 Roster Test', [{ userId, role: 'instructor' }]);
  await testDb().insert(courseMembers).values({ courseId: DEMO_COURSE, userId, role: 'instructor' });
  page = await (await newContext(browser, DESKTOP)).newPage();
});

afterAll(async () => {
  await browser?.close();
  await closeTestDb();
});

async function saved(download: Download) {
  const file = await download.path();
  return { name: download.suggestedFilename(), text: await fs.readFile(file!, 'utf8') };
}

describe('data in and out, in Chromium', () => {
  it('an instructor uploads a roster, sees the preview, imports it; the same file again has nothing to import', async () => {
    await page.goto('/sign-in');
    await signInInBrowser(page, email);
    await page.goto(`/courses/${courseId}`);
    await page.getByRole('link', { name: 'Roster upload' }).click();
    await expect.poll(() => page.getByRole('heading', { name: 'Roster upload' }).isVisible()).toBe(true);
    const fixture = path.resolve('tests/fixtures/roster/good-semicolon-bom.csv');
    await page.getByLabel('Roster file (CSV)').setInputFiles(fixture);
    await page.getByRole('button', { name: 'Check the file' }).click();
    const preview = page.getByRole('table', { name: 'Roster preview' });
    await expect.poll(() => preview.locator('tbody tr').count()).toBe(3);
    await expect.poll(() => preview.getByText('Sina Karlsson-Åberg').isVisible()).toBe(true);
    expect(await preview.getByText('New participant').count()).toBe(3);
    await page.getByRole('button', { name: 'Import 3 people' }).click();
    await expect.poll(() => page.getByText('3 new participants added and e-mailed').isVisible()).toBe(true);

    await page.getByLabel('Roster file (CSV)').setInputFiles(fixture);
    await page.getByRole('button', { name: 'Check the file' }).click();
    await expect.poll(() => page.getByText('there is nothing to import').isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: /^Import/ }).count()).toBe(0);

    // a file with bad lines: the problems by line, and no import button
    await page.getByLabel('Roster file (CSV)').setInputFiles(path.resolve('tests/fixtures/roster/bad-lines.csv'));
    await page.getByRole('button', { name: 'Check the file' }).click();
    const problems = page.getByRole('list', { name: 'Problems by line' });
    await expect.poll(() => problems.locator('li').count()).toBe(8);
    await expect.poll(() => problems.getByText('duplicate e-mail hugo.marsh@roster.parley.test (first on line 2)').isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: /^Import/ }).count()).toBe(0);
    expect(pageErrors).toEqual([]);
  });

  it('downloads a panel and a credit sheet of a completed demo session, and e-mails the results with live progress', async () => {
    await page.goto(`/courses/${DEMO_COURSE}`);
    await page.getByRole('link', { name: 'Data', exact: true }).click();
    await expect.poll(() => page.getByRole('table', { name: 'Completed sessions' }).isVisible()).toBe(true);

    const [panelDownload] = await Promise.all([
      page.waitForEvent('download'),
      page.getByRole('link', { name: 'CSV panel of session 2' }).click(),
    ]);
    const panel = await saved(panelDownload);
    expect(panel.name).toBe('parley-session-2-panel.csv');
    const rows = Papa.parse<Record<string, string>>(panel.text, { header: true, skipEmptyLines: true });
    expect(rows.meta.fields).toEqual(PANEL_COLUMNS);
    expect(rows.data.length).toBeGreaterThan(100);
    expect(new Set(rows.data.map((r) => r.pseudonym)).size).toBe(40);
    expect(panel.text).not.toContain('@halvorsen.example');

    await page.getByRole('link', { name: 'Credit & results of session 2' }).click();
    await expect.poll(() => page.getByRole('heading', { name: 'Session 2: credit and results' }).isVisible()).toBe(true);
    const [creditDownload] = await Promise.all([
      page.waitForEvent('download'),
      page.getByRole('link', { name: 'Download credit sheet (CSV)' }).click(),
    ]);
    const credit = await saved(creditDownload);
    expect(credit.name).toBe('parley-session-2-credit.csv');
    const sheet = Papa.parse<Record<string, string>>(credit.text, { header: true, skipEmptyLines: true });
    expect(sheet.meta.fields).toEqual(['student_id', 'name', 'email', 'pseudonym', 'points', 'credit']);
    expect(sheet.data).toHaveLength(40);
    expect(sheet.data[0]).toMatchObject({ student_id: 'HC27-1001', email: 'student01@halvorsen.example', credit: '1' });

    const url = page.url();
    await page.getByRole('button', { name: 'E-mail results to all 40 participants' }).click();
    await expect.poll(() => page.getByText('40 results e-mails queued.').isVisible()).toBe(true);
    // the progress follows by polling, without a navigation
    await expect.poll(() => page.getByText('40 of 40 sent · 0 failed · 0 waiting').isVisible(), { timeout: 30_000 }).toBe(true);
    expect(page.url()).toBe(url);
    expect(await page.getByRole('table', { name: 'Results e-mails' }).getByText('Sent').count()).toBe(40);
    expect(pageErrors).toEqual([]);
  });
});
