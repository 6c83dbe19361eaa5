// The big screen as a projector page, for the back row of a lecture hall (issue 12): full width at
// 1920×1080, type readable from 20 m, the join code kept while late joiners can still play, the
// pause as a banner, the round's draw shown large, a placeholder before the chart has data, a
// closing slide, a cancelled slide. Players act over real sockets; the screen is real Chromium.
import path from 'node:path';
import { and, eq } from 'drizzle-orm';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { supergameDraws } from '#app/lib/draws';
import { type DesignInput, designSchema } from '#app/lib/design';
import { sessions } from '#drizzle/schema';
import type { ParticipantView } from '#realtime/engine/types';
import { contextAs, launch, pageErrors, PHONE } from '#tests/helpers/browser';
import { closeTestDb, testDb } from '#tests/helpers/db';
import { type Client, signIn } from '#tests/helpers/http';
import { classOf, closeSockets, connect, join, type TestSocket } from '#tests/helpers/live';

const PROJECTOR = { viewport: { width: 1920, height: 1080 } };

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  closeSockets();
  await browser?.close();
  await closeTestDb();
});

/** Screenshots for a person to look at, when PARLEY_SHOTS names a folder. */
async function shot(page: Page, name: string) {
  if (process.env.PARLEY_SHOTS) await page.screenshot({ path: path.join(process.env.PARLEY_SHOTS, `${name}.png`) });
}

async function screenPage(client: Client, sessionId: number, size: typeof PROJECTOR | typeof PHONE): Promise<Page> {
  const page = await (await contextAs(browser, client, size)).newPage();
  await page.goto(`/screen/${sessionId}`);
  return page;
}

/** The smallest font size of any visible text on the page, with the text. */
function smallestText(page: Page) {
  return page.evaluate(() => {
    let min = { size: Number.POSITIVE_INFINITY, text: '' };
    const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
    for (let n = walker.nextNode(); n; n = walker.nextNode()) {
      const text = n.textContent!.trim();
      const el = n.parentElement!;
      const box = el.getBoundingClientRect();
      // text for screen readers only (1 px boxes) is not on the screen
      if (!text || box.width <= 1 || box.height <= 1 || getComputedStyle(el).visibility === 'hidden') continue;
      const size = parseFloat(getComputedStyle(el).fontSize);
      if (size < min.size) min = { size, text };
    }
    return min;
  });
}

const fontSize = (page: Page, testId: string) => page.getByTestId(testId).evaluate((el) => parseFloat(getComputedStyle(el).fontSize));
const width = async (page: Page, testId: string) => (await page.getByTestId(testId).boundingBox())?.width ?? 0;
const overflows = (page: Page) =>
  page.evaluate(() => ({
    x: document.documentElement.scrollWidth > window.innerWidth,
    y: document.documentElement.scrollHeight > window.innerHeight,
  }));

/** This file's class: a course called Lecture hall, a session opened with `seed`; the phones join in phones(). */
const hallClass = (n: number, design: Partial<DesignInput>, seed: number) =>
  classOf(n, { design, open: { seed: String(seed) }, join: false, tag: 'bs', title: 'Lecture hall' });

/** Phones over sockets, each with the latest view it was sent. */
async function phones(players: Client[], code: string, sessionId: number) {
  const seats: { socket: TestSocket; latest: ParticipantView | null }[] = [];
  for (const p of players) {
    await join(p, code);
    const socket = await connect(p.cookieHeader());
    const seat: { socket: TestSocket; latest: ParticipantView | null } = { socket, latest: null };
    socket.on('view:participant', (v) => {
      seat.latest = v;
    });
    const ack = await socket.emitWithAck('session:watch', { sessionId, as: 'participant' });
    if (ack.ok && !seat.latest) seat.latest = ack.data as ParticipantView;
    seats.push(seat);
  }
  /** Every phone chooses `action` in this round of this supergame, once its screen asks. */
  const playRound = async (supergame: number, round: number, action: 'C' | 'D') => {
    for (const [i, seat] of seats.entries()) {
      await expect
        .poll(() => seat.latest?.status === 'choosing' && seat.latest.supergame === supergame && seat.latest.round === round, {
          timeout: 10_000,
        })
        .toBe(true);
      const ack = await seat.socket
        .timeout(8000)
        .emitWithAck('choice:submit', { sessionId, supergame, round, action, clientChoiceId: `bs-${i}-${supergame}-${round}-choice` });
      expect(ack.ok).toBe(true);
    }
  };
  return { playRound };
}

describe('the big screen on a 1920×1080 projector', () => {
  it('running: full width, large type, the join code while late joiners can still play, the draw, the pause banner, the closing slide', async () => {
    const delta = 0.75;
    // Supergame 1 lasts 2 to 4 rounds, so the test sees a draw that continues and one that ends.
    let seed = 1;
    while (!(supergameDraws(seed, delta, 1).length >= 2 && supergameDraws(seed, delta, 1).length <= 4)) seed++;
    const sg1 = supergameDraws(seed, delta, 1);
    const { sessionId, code, instructor, players } = await hallClass(4, { supergames: 3, delta, roundSeconds: 120 }, seed);
    const staff = await connect(instructor.cookieHeader());
    const control = async (command: 'start' | 'pause' | 'resume' | 'end-now') =>
      expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command })).ok).toBe(true);

    const page = await screenPage(instructor, sessionId, PROJECTOR);
    const phone = await screenPage(instructor, sessionId, PHONE);
    const play = await phones(players, code, sessionId);
    await expect.poll(() => page.getByTestId('big-joined').textContent()).toBe('4');
    expect(await page.getByTestId('big-join-code').textContent()).toBe(code);
    await shot(page, 'big-screen-open-1920');
    await shot(phone, 'big-screen-open-phone');
    expect(await overflows(phone)).toMatchObject({ x: false });

    await control('start');
    await expect.poll(() => page.getByTestId('big-status').textContent()).toContain('Running');
    // Late joining is open: the code stays, and says from when a late joiner plays.
    // Before: the code left the screen as soon as the session ran.
    await expect.poll(() => page.getByTestId('big-join-code').isVisible()).toBe(true);
    expect(await page.getByTestId('big-join').textContent()).toContain('supergame 2');
    // No round is over yet: a placeholder, not an empty chart. Before: an empty heading.
    await expect.poll(() => page.getByTestId('chart-placeholder').isVisible()).toBe(true);
    // Full width of a 1920-px screen (before: about 60 %), readable from the back row.
    expect(await width(page, 'big-screen')).toBeGreaterThanOrEqual(1800);
    const small = await smallestText(page);
    expect(small.size, `"${small.text}" is ${small.size} px`).toBeGreaterThanOrEqual(28);
    expect(await fontSize(page, 'big-join-code')).toBeGreaterThanOrEqual(48);
    expect(await overflows(page)).toEqual({ x: false, y: false });
    await shot(page, 'big-screen-running-1920');

    // Round 1: everyone has seen the draw, so the room sees it, large.
    await play.playRound(1, 1, 'C');
    await expect.poll(() => page.getByTestId('big-draw').textContent()).toBe(`Draw ${sg1.draws[0]} ≤ 75 — another round`);
    // Source: common practice — the supergame goes on while the draw is ≤ 100·δ = 75.
    expect(sg1.draws[0]).toBeLessThanOrEqual(75);
    expect(await fontSize(page, 'big-draw')).toBeGreaterThanOrEqual(48);
    await expect.poll(() => page.getByTestId('chart-placeholder').count()).toBe(0);
    expect(await page.getByTestId('chart-round').first().textContent()).toContain('100 %');
    expect(await overflows(page)).toEqual({ x: false, y: false });
    await shot(page, 'big-screen-draw-1920');
    await shot(phone, 'big-screen-draw-phone');
    expect(await overflows(phone)).toMatchObject({ x: false });

    // Pause: a banner across the screen, not a word in a corner.
    await control('pause');
    await expect.poll(() => page.getByTestId('pause-banner').isVisible()).toBe(true);
    expect(await page.getByTestId('pause-banner').textContent()).toContain('Paused');
    expect(await width(page, 'pause-banner')).toBeGreaterThanOrEqual(1800);
    expect(
      await page
        .getByTestId('pause-banner')
        .getByText('Paused')
        .evaluate((el) => parseFloat(getComputedStyle(el).fontSize)),
    ).toBeGreaterThanOrEqual(48);
    await shot(page, 'big-screen-paused-1920');
    await shot(phone, 'big-screen-paused-phone');
    await control('resume');
    await expect.poll(() => page.getByTestId('pause-banner').count()).toBe(0);

    // The rest of supergame 1; its last draw ends it and stays up while supergame 2 begins.
    for (let round = 2; round <= sg1.length; round++) await play.playRound(1, round, 'D');
    const last = sg1.draws[sg1.length - 1];
    await expect.poll(() => page.getByTestId('big-draw').textContent()).toBe(`Draw ${last} > 75 — the supergame ends`);
    // Source: common practice — the first draw above 100·δ ends the supergame.
    expect(last).toBeGreaterThan(75);
    await expect.poll(() => page.getByTestId('chart-placeholder').isVisible()).toBe(true);
    expect(await page.getByTestId('big-join').textContent()).toContain('supergame 3');
    await shot(page, 'big-screen-ends-1920');

    // End now, in supergame 2: the closing slide, and no join code.
    await control('end-now');
    await page.getByRole('heading', { name: /Thank you/ }).waitFor();
    expect(await page.getByTestId('big-join-code').count()).toBe(0);
    const rows = page.getByTestId('closing-supergame');
    expect(await rows.count()).toBe(2);
    // Supergame 1: 4 of the 4·L own choices were X (round 1 only). Source: common practice.
    const coop1 = Math.round(100 / sg1.length);
    expect(await rows.nth(0).textContent()).toMatch(new RegExp(`Supergame 1.*${coop1} %.*${sg1.length} rounds?`));
    expect(await rows.nth(1).textContent()).toMatch(/Supergame 2.*ended early/);
    const closingSmall = await smallestText(page);
    expect(closingSmall.size, `"${closingSmall.text}" is ${closingSmall.size} px`).toBeGreaterThanOrEqual(28);
    expect(await overflows(page)).toEqual({ x: false, y: false });
    await shot(page, 'big-screen-complete-1920');
    await phone.getByRole('heading', { name: /Thank you/ }).waitFor();
    expect(await overflows(phone)).toMatchObject({ x: false });
    await shot(phone, 'big-screen-complete-phone');
    expect(pageErrors).toEqual([]);
  });

  it('cancelled: a plain slide that says so, without the code', async () => {
    const { sessionId, code, instructor } = await hallClass(0, { supergames: 2 }, 11);
    const page = await screenPage(instructor, sessionId, PROJECTOR);
    expect(await page.getByTestId('big-join-code').textContent()).toBe(code);
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'cancel' })).ok).toBe(true);
    await page.getByRole('heading', { name: 'This session was cancelled' }).waitFor();
    expect(await page.getByTestId('big-join-code').count()).toBe(0);
    await shot(page, 'big-screen-cancelled-1920');
    // A reload shows the same slide from the first byte, before any socket.
    await page.reload();
    await page.getByRole('heading', { name: 'This session was cancelled' }).waitFor();
    const phone = await screenPage(instructor, sessionId, PHONE);
    await phone.getByRole('heading', { name: 'This session was cancelled' }).waitFor();
    await shot(phone, 'big-screen-cancelled-phone');
    expect(pageErrors).toEqual([]);
  });

  it("the demo's completed session: a closing slide with all 20 supergames that fits the screen", async () => {
    const demo = (
      await testDb()
        .select()
        .from(sessions)
        .where(and(eq(sessions.simulated, true), eq(sessions.status, 'complete')))
    ).find((x) => designSchema.parse(x.params).supergames === 20)!;
    const design = designSchema.parse(demo.params);
    const page = await screenPage(await signIn('r.okafor@halvorsen.example'), demo.id, PROJECTOR);
    await page.getByRole('heading', { name: /Thank you/ }).waitFor();
    const rows = page.getByTestId('closing-supergame');
    expect(await rows.count()).toBe(20);
    // Each supergame's length is the one its draws gave. Source: common practice (the first draw above 100·δ ends it).
    for (let sg = 1; sg <= 20; sg++) {
      const length = supergameDraws(Number(demo.seed), design.delta, sg, design.termination).length;
      expect(await rows.nth(sg - 1).textContent()).toMatch(
        new RegExp(`^Supergame ${sg}: \\d+ % chose ${design.labels.C}, ${length} rounds?\\.`),
      );
    }
    expect(await page.getByTestId('big-join-code').count()).toBe(0);
    const small = await smallestText(page);
    expect(small.size, `"${small.text}" is ${small.size} px`).toBeGreaterThanOrEqual(28);
    expect(await overflows(page)).toEqual({ x: false, y: false });
    await shot(page, 'big-screen-demo-complete-1920');
    const phone = await screenPage(await signIn('r.okafor@halvorsen.example'), demo.id, PHONE);
    await phone.getByRole('heading', { name: /Thank you/ }).waitFor();
    expect(await overflows(phone)).toMatchObject({ x: false });
    await shot(phone, 'big-screen-demo-complete-phone');
    expect(pageErrors).toEqual([]);
  });
});
