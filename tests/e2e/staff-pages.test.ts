// Staff pages of issue 12 in Chromium: the Debrief's captions and Methods page, its legends, the
// Floor's rows and waiting time, the design editor at 1440 px, e-mail addresses that wrap.
import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Locator } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, launch, pageAs as pageOf, pageErrors, PHONE } from '#tests/helpers/browser';
import { closeTestDb, createCourse, createUser } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { classOf, closeSockets, connect, nextView } from '#tests/helpers/live';

const SHOTS = path.resolve('.data/test/screenshots');

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
  fs.mkdirSync(SHOTS, { recursive: true });
});
afterAll(async () => {
  closeSockets();
  await browser?.close();
  await closeTestDb();
});

const pageAs = (client: Client, url: string, size: typeof DESKTOP | typeof PHONE = DESKTOP) => pageOf(browser, client, url, size);

const centreY = async (l: Locator) => {
  const b = (await l.boundingBox())!;
  return b.y + b.height / 2;
};

describe('the Debrief', () => {
  it('captions say what they count in the app’s own words and link to the Methods page; a course-credit session is not “paid”', async () => {
    const instructor = await signIn('r.okafor@halvorsen.example');
    // Demo session #1 is a course-credit session (seeds/demo.ts: credit kind "participation").
    const page = await pageAs(instructor, '/courses/1/debrief/1');
    await page.locator('figure[data-chart="lengths"] .recharts-surface').first().waitFor();
    const main = (await page.locator('main').textContent())!;
    expect(main).not.toMatch(/methods\.md|§/);
    // Before the fix: "Own, paid choices", "Own choices in paid rounds", "every paid round".
    expect(main).not.toMatch(/\bpaid\b/i);
    for (const id of ['cooperation-by-supergame', 'cooperation-by-round', 'outcomes', 'lengths', 'points', 'theory']) {
      const link = page.locator(`figure[data-chart="${id}"] figcaption`).getByRole('link', { name: /How this is computed/ });
      expect(await link.getAttribute('href')).toBe(`/methods#${id}`);
    }
    await page
      .locator('figure[data-chart="lengths"] figcaption')
      .getByRole('link', { name: /How this is computed/ })
      .click();
    await expect.poll(() => page.title()).toBe('Methods · Parley');
    const lengths = page.locator('#lengths');
    expect(await lengths.textContent()).toContain('P(L = k) = (1 − δ) δ^(k − 1)');
    const methods = (await page.locator('main').textContent())!;
    for (const source of [
      'Dal Bó, P. & Fréchette, G. R. (2011)',
      'Blonski, M., Ockenfels, P. & Spagnolo, G. (2011)',
      'Fréchette, G. R. & Yuksel, S. (2017)',
      'Pearson, K. (1900)',
      'Friedman, J. W. (1971)',
    ])
      expect(methods).toContain(source);
    expect(methods).not.toMatch(/methods\.md|§/);
    await page.screenshot({ path: path.join(SHOTS, 'methods-desktop.png'), fullPage: true });
    expect(pageErrors).toEqual([]);
  });

  it('comparison charts name each session once in their legend, and legend entries do not overlap', async () => {
    const researcher = await signIn('m.achterberg@halvorsen.example');
    for (const [size, name] of [
      [DESKTOP, 'desktop'],
      [PHONE, 'phone'],
    ] as const) {
      const page = await pageAs(researcher, '/courses/1/debrief/compare?sessions=1,2', size);
      await page.locator('figure[data-chart="theory"] .recharts-surface').first().waitFor();
      for (const id of ['cooperation-by-supergame', 'cooperation-by-round', 'outcomes', 'lengths', 'points', 'theory']) {
        const legend = page.locator(`figure[data-chart="${id}"] .recharts-legend-wrapper`);
        const text = (await legend.textContent())!;
        // Before the fix: "#1 Short horizon (δ = 1/2) — demo" twice or more in four of the six.
        expect([id, text.split('Short horizon').length - 1, text.split('Long horizon').length - 1]).toEqual([id, 1, 1]);
        const boxes = await legend
          .locator('li')
          .evaluateAll((els) => els.map((e) => e.getBoundingClientRect()).map((r) => ({ l: r.left, r: r.right, t: r.top, b: r.bottom })));
        for (let i = 0; i < boxes.length; i++)
          for (let j = i + 1; j < boxes.length; j++) {
            const [a, b] = [boxes[i], boxes[j]];
            const overlap = a.l < b.r - 1 && b.l < a.r - 1 && a.t < b.b - 1 && b.t < a.b - 1;
            expect([id, i, j, overlap]).toEqual([id, i, j, false]);
          }
      }
      await page.screenshot({ path: path.join(SHOTS, `debrief-compare-legends-${name}.png`), fullPage: true });
      await page.context().close();
    }
    expect(pageErrors).toEqual([]);
  });
});

describe('the Floor', () => {
  it('says "Pair 1", puts each seat’s buttons on its own row, and counts "Waiting" from the pair’s first choice', async () => {
    const { courseId, sessionId, instructor, players } = await classOf(2, {
      design: { supergames: 2, delta: 0.9, roundSeconds: 120 },
      tag: 'floor',
    });
    const sockets = [];
    for (const p of players) {
      const s = await connect(p.cookieHeader());
      expect((await s.emitWithAck('session:watch', { sessionId, as: 'participant' })).ok).toBe(true);
      sockets.push(s);
    }
    const first = nextView(sockets[0], (v) => v.status === 'choosing' && v.round === 1);
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'start' })).ok).toBe(true);
    await first;

    const page = await pageAs(instructor, `/courses/${courseId}/sessions/${sessionId}/floor`);
    await page.getByRole('button', { name: 'Nudge P-001' }).waitFor();
    const waiting = () =>
      page.evaluate(() => {
        const heads = [...document.querySelectorAll('thead th')].map((th) => th.textContent?.trim());
        const row = document.querySelector('tbody tr')!;
        return row.children[heads.indexOf('Waiting')]?.textContent?.trim();
      });
    // Before the fix: the pair id "s1-p1".
    expect((await page.locator('tbody tr').first().locator('td, th').first().textContent())?.trim()).toBe('Pair 1');
    // Nobody has chosen: nobody waits yet (before the fix it counted from the round's opening).
    await page.waitForTimeout(4500);
    expect(await waiting()).toBe('—');
    const me = (await sockets[0].emitWithAck('session:watch', { sessionId, as: 'participant' })) as {
      ok: true;
      data: { supergame: number; round: number };
    };
    expect(
      (
        await sockets[0].emitWithAck('choice:submit', {
          sessionId,
          supergame: me.data.supergame,
          round: me.data.round,
          action: 'C',
          clientChoiceId: `floor-${sessionId}-0`,
        })
      ).ok,
    ).toBe(true);
    await expect.poll(waiting).toMatch(/^[0-2] s$/);

    // Each seat's Nudge sits on the line of that seat's pseudonym.
    for (const who of ['P-001', 'P-002']) {
      const seat = page.getByTestId('seat-name').filter({ hasText: who });
      const nudge = page.getByRole('button', { name: `Nudge ${who}` });
      expect([who, Math.abs((await centreY(seat)) - (await centreY(nudge))) <= 6]).toEqual([who, true]);
    }
    await page.screenshot({ path: path.join(SHOTS, 'floor-desktop.png'), fullPage: true });

    // The names behind the pseudonyms, on demand (the session-names route, through a fetcher).
    const named = () => page.getByTestId('seat-name').filter({ hasText: '@' }).count();
    expect(await named()).toBe(0);
    await page.getByRole('button', { name: 'Show names' }).click();
    await expect.poll(named).toBe(2);
    expect((await page.getByTestId('seat-name').first().textContent())?.trim()).toMatch(/^P-00[12] · floor-p[01]-.+@tests\.parley\.test$/);
    await page.screenshot({ path: path.join(SHOTS, 'floor-names-desktop.png'), fullPage: true });
    await page.getByRole('button', { name: 'Hide names' }).click();
    await expect.poll(named).toBe(0);
    expect(pageErrors).toEqual([]);
  });
});

describe('the design editor at 1440 px', () => {
  it('shows the whole automaton builder, says at once that δ = 1.2 is not allowed, and after an invalid save shows the error with the theory panel in view', async () => {
    const email = uniqueEmail('editor-1440');
    const userId = await createUser(email);
    const courseId = await createCourse('Editor layout', [{ userId, role: 'instructor' }]);
    const page = await pageAs(await signIn(email), `/courses/${courseId}/designs/new`);
    await page.getByLabel('Strategy', { exact: true }).selectOption('__new__');
    await page.getByRole('button', { name: 'Add a state' }).click();
    const section = page.getByRole('region', { name: 'Strategy checker' });
    const sec = (await section.boundingBox())!;
    for (const l of [page.getByLabel('State 2, next after (D, D)'), page.getByRole('button', { name: 'Remove state 2' })]) {
      const b = (await l.boundingBox())!;
      // Before the fix: (D, D) and Remove sat beyond the panel's right edge, in a sideways scroll.
      expect(b.x + b.width <= sec.x + sec.width).toBe(true);
      expect(
        await l.evaluate((el) => {
          for (let a = el.parentElement; a; a = a.parentElement)
            if (a.scrollWidth > a.clientWidth + 1 && getComputedStyle(a).overflowX !== 'visible') return false;
          return true;
        }),
      ).toBe(true);
    }
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(1440);

    await page.getByLabel('Name', { exact: true }).fill('Too sure');
    const delta = page.getByLabel('δ (chance of another round)');
    await delta.fill('1.2');
    // Inline while typing, before any save.
    await page.getByText('δ must be less than 1').waitFor();
    expect(await delta.getAttribute('aria-invalid')).toBe('true');

    await page.getByRole('button', { name: 'Create design' }).scrollIntoViewIfNeeded();
    await page.getByRole('button', { name: 'Create design' }).click();
    await page.getByText('Some fields need attention; nothing was saved.').waitFor();
    // Before the fix the page stayed at the bottom: the error out of sight, the theory panel mid-page.
    await expect.poll(() => delta.evaluate((el) => el === document.activeElement)).toBe(true);
    const d = (await delta.boundingBox())!;
    expect(d.y >= 0 && d.y + d.height <= 900).toBe(true);
    const theory = (await page.getByRole('heading', { name: 'Theory' }).boundingBox())!;
    expect(theory.y >= 0 && theory.y < 450).toBe(true);
    await page.screenshot({ path: path.join(SHOTS, 'design-invalid-1440.png') });
    expect(pageErrors).toEqual([]);
  });
});

describe('e-mail addresses', () => {
  it('wrap only at “@” or “.”, never inside a word (phone)', async () => {
    const email = uniqueEmail('emails');
    const userId = await createUser(email);
    const courseId = await createCourse('Long addresses', [{ userId, role: 'instructor' }]);
    const instructor = await signIn(email);
    const long = `teaching-assistant-with-a-long-name-${Date.now()}@department-of-economics.halvorsen.example`;
    expect(
      (await instructor.post(`/courses/${courseId}/members`, { intent: 'invite', email: long, role: 'assistant' })).status,
    ).toBeLessThan(400);
    const page = await pageAs(instructor, `/courses/${courseId}/members`, PHONE);
    const el = page.getByText(long, { exact: true });
    const starts = await el.evaluate((node) => {
      // Where each visual line of the address starts: a character lower than the one before it.
      const text = node.textContent!;
      const tops: number[] = [];
      let offset = 0;
      const walker = document.createTreeWalker(node, NodeFilter.SHOW_TEXT);
      for (let t = walker.nextNode(); t; t = walker.nextNode()) {
        for (let i = 0; i < t.textContent!.length; i++) {
          const r = document.createRange();
          r.setStart(t, i);
          r.setEnd(t, i + 1);
          tops[offset + i] = r.getBoundingClientRect().top;
        }
        offset += t.textContent!.length;
      }
      const out: string[] = [];
      for (let i = 1; i < text.length; i++) if (tops[i] > tops[i - 1] + 2) out.push(`${text[i - 1]}|${text[i]}`);
      return out;
    });
    expect(starts.length).toBeGreaterThan(0);
    // Before the fix (break-all): lines split anywhere, e.g. "n|a".
    for (const s of starts) expect(s).toMatch(/^[^|]*\|[@.]$|^[@.-]\|/);
    expect(pageErrors).toEqual([]);
  });
});
