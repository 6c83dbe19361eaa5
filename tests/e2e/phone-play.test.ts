// The phone during play (issue 12, bug 1 and "Phones"): a tap made while the network is off is
// kept and sent when the phone is back online, and the screen says so instead of "Not recorded".
import fs from 'node:fs';
import path from 'node:path';
import { and, eq } from 'drizzle-orm';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { choices, sessionParticipants } from '#drizzle/schema';
import { contextAs, launch, pageErrors, PHONE } from '#tests/helpers/browser';
import type { DesignInput } from '#app/lib/design';
import { closeTestDb, testDb } from '#tests/helpers/db';
import type { Client } from '#tests/helpers/http';
import { classOf, closeSockets, connect, nextView } from '#tests/helpers/live';

// Screenshots to look at after a run (not compared by the test).
const SHOTS = path.resolve('.data/test/screenshots');

let browser: Browser;
beforeAll(async () => {
  fs.mkdirSync(SHOTS, { recursive: true });
  browser = await launch();
});
afterAll(async () => {
  closeSockets();
  await browser?.close();
  await closeTestDb();
});

/** This file's class: a course called Outbox whose participants have names, all joined. */
const outboxClass = (n: number, design: Partial<DesignInput>, open: Record<string, string> = {}) =>
  classOf(n, { design, open, tag: 'ob', title: 'Outbox', playerName: (i) => `Player ${i}` });

/** A phone carrying a participant's sign-in cookie. */
async function phoneOf(client: Client): Promise<{ ctx: BrowserContext; page: Page }> {
  const ctx = await contextAs(browser, client, PHONE);
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
    // Seed 2 draws 14 after round 1 (≤ 50): the supergame goes on, so the phone shows round 1's result.
    const { sessionId, instructor, players, playerIds } = await outboxClass(
      2,
      { roundSeconds: 40, supergames: 1, delta: 0.5, labels: { C: 'Cooperate', D: 'Defect' } },
      { seed: '2' },
    );
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
    await page.screenshot({ path: path.join(SHOTS, 'phone-offline-choice.png') });

    // A few seconds later the network comes back, with most of the round left.
    await new Promise((r) => setTimeout(r, 3000));
    await ctx.setOffline(false);
    const key = await participantKey(sessionId, playerIds[0]);
    // Before the fix: nothing was sent again, and 40 s later the timeout rule filled the choice.
    await expect
      .poll(
        async () =>
          (
            await testDb()
              .select()
              .from(choices)
              .where(and(eq(choices.sessionId, sessionId), eq(choices.participantKey, key!)))
          ).map((r) => `${r.supergame}/${r.round} ${r.action} ${r.source}`),
        {
          timeout: 20_000,
        },
      )
      .toEqual(['1/1 D player']);
    await expect.poll(() => text(page)).toMatch(/You chose ● ?Defect/);

    // The partner chooses; the round resolves with the phone's own Defect, not a timeout.
    const resolved = nextView(partner, (v) => v.lastResult?.round === 1);
    const ack = await partner
      .timeout(8000)
      .emitWithAck('choice:submit', { sessionId, supergame: 1, round: 1, action: 'C', clientChoiceId: 'partner-1-1-xyz' });
    expect(ack.ok).toBe(true);
    expect((await resolved).lastResult).toMatchObject({ own: 'C', partner: 'D' });
    await expect.poll(() => page.getByTestId('last-result').textContent()).toMatch(/Round 1: you ● ?Defect, partner ◆ ?Cooperate/);
    expect(await text(page)).not.toMatch(/back online|Not recorded/);
    expect(pageErrors.splice(0).filter((e) => !/ERR_INTERNET_DISCONNECTED|WebSocket/.test(e))).toEqual([]);
  });

  it('tells a partner in plain words what the computer that took the other seat does, and the handed-over participant that the supergame goes on', async () => {
    const { sessionId, instructor, players, playerIds } = await outboxClass(2, {
      roundSeconds: 60,
      supergames: 2,
      delta: 0.9,
      labels: { C: 'Cooperate', D: 'Defect' },
    });
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
    const handed = await staff
      .timeout(8000)
      .emitWithAck('participant:act', { sessionId, participantId: key!, action: 'hand-to-computer', strategy: 'TFT' });
    expect(handed.ok).toBe(true);

    // Before the fix: "a computer that follows a fixed rule (TFT)".
    await stays.getByText('Your partner is a computer', { exact: true }).waitFor();
    expect
      .soft(await text(stays))
      .toContain(
        'The participant you were paired with left, so for the rest of this supergame your partner is a computer that starts with Cooperate and then copies what you did last round.',
      );
    expect.soft(await text(stays)).not.toMatch(/TFT|fixed rule|Tit-for-tat/);
    await stays.screenshot({ path: path.join(SHOTS, 'phone-computer-partner.png') });

    // The supergame goes on for the pair: the handed-over participant is not told it is over.
    // Before the fix: "Supergame 1 is over" while the computer played on in the seat.
    await expect.poll(() => leaves.locator('h1').textContent()).not.toContain('Round 1');
    expect(await leaves.locator('h1').textContent()).toBe('A computer plays for you in this supergame');
    const told = await text(leaves);
    expect(told).not.toMatch(/Supergame 1 is over/);
    expect(told).toMatch(/a computer took your seat for the rest of supergame 1/);
    await leaves.screenshot({ path: path.join(SHOTS, 'phone-handed-over.png') });

    // The pair plays on against the computer: a tap is recorded and answered by tit-for-tat.
    await stays.getByRole('button', { name: 'Defect' }).click();
    await expect.poll(() => stays.getByTestId('last-result').textContent()).toMatch(/Round 1: you ● ?Defect, partner ◆ ?Cooperate/);
    expect(pageErrors.splice(0)).toEqual([]);
  });

  it('holds a tap while the server has lost its database, and sends it again after an "unavailable" answer', async () => {
    const { sessionId, instructor, players, playerIds } = await outboxClass(2, {
      roundSeconds: 60,
      supergames: 1,
      delta: 0.5,
      labels: { C: 'Cooperate', D: 'Defect' },
    });
    const { page } = await phoneOf(players[0]);
    // Between the phone and the server: inject the server's 'storage:status' events, and answer
    // the first choice as a server with a stalled database does ('unavailable', outcome unknown).
    const sent: string[] = [];
    let toPage: ((frame: string) => void) | null = null;
    let stallNext = true;
    await page.routeWebSocket(/\/socket\.io\//, (ws) => {
      const server = ws.connectToServer();
      toPage = (frame) => ws.send(frame);
      ws.onMessage((frame) => {
        const m = /^42(\d+)\["choice:submit",(.*)\]$/.exec(String(frame));
        if (m) sent.push(m[2]);
        if (m && stallNext) {
          stallNext = false;
          ws.send(`43${m[1]}[${JSON.stringify({ ok: false, code: 'unavailable', message: 'The database did not answer in time.' })}]`);
          return;
        }
        server.send(frame);
      });
      server.onMessage((frame) => ws.send(frame));
    });
    await page.goto(`/play/${sessionId}`);
    await page.getByRole('heading', { name: 'You are in' }).waitFor();
    await expect.poll(async () => /\bconnected\b/.test(await text(page))).toBe(true);
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'start' })).ok).toBe(true);
    await page.getByTestId('round-title').waitFor();

    toPage!(`42${JSON.stringify(['storage:status', { ok: false }])}`);
    await page.getByText('Reconnecting…', { exact: true }).waitFor();
    await page.getByRole('button', { name: 'Defect' }).click();
    await expect.poll(() => text(page)).toMatch(/Your choice \(● ?Defect\) will be sent when the connection is back/);
    await page.screenshot({ path: path.join(SHOTS, 'phone-storage-lost-choice.png') });
    await new Promise((r) => setTimeout(r, 1000));
    expect(sent).toEqual([]);

    toPage!(`42${JSON.stringify(['storage:status', { ok: true }])}`);
    const key = await participantKey(sessionId, playerIds[0]);
    await expect
      .poll(async () =>
        (
          await testDb()
            .select()
            .from(choices)
            .where(and(eq(choices.sessionId, sessionId), eq(choices.participantKey, key!)))
        ).map((r) => `${r.action} ${r.source}`),
      )
      .toEqual(['D player']);
    // Sent twice, the second time with the same client choice id, so it could only be stored once.
    expect(sent).toHaveLength(2);
    const [first, second] = sent.map((p) => JSON.parse(p) as { clientChoiceId: string; action: string });
    expect(second).toEqual(first);
    await expect.poll(() => text(page)).toMatch(/You chose ● ?Defect/);
    expect(await text(page)).not.toMatch(/Reconnecting|will be sent/);
    expect(pageErrors.splice(0)).toEqual([]);
  });

  it('keeps a tap that could not be sent across a reload of the page, and sends it after', async () => {
    const { sessionId, instructor, players, playerIds } = await outboxClass(2, {
      roundSeconds: 60,
      supergames: 1,
      delta: 0.5,
      labels: { C: 'Cooperate', D: 'Defect' },
    });
    const { page } = await phoneOf(players[0]);
    let toPage: ((frame: string) => void) | null = null;
    await page.routeWebSocket(/\/socket\.io\//, (ws) => {
      ws.connectToServer();
      toPage = (frame) => ws.send(frame);
    });
    await page.goto(`/play/${sessionId}`);
    await page.getByRole('heading', { name: 'You are in' }).waitFor();
    await expect.poll(async () => /\bconnected\b/.test(await text(page))).toBe(true);
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'start' })).ok).toBe(true);
    await page.getByTestId('round-title').waitFor();
    toPage!(`42${JSON.stringify(['storage:status', { ok: false }])}`);
    await page.getByText('Reconnecting…', { exact: true }).waitFor();
    await page.getByRole('button', { name: 'Cooperate' }).click();
    await expect.poll(() => text(page)).toMatch(/Your choice \(◆ ?Cooperate\) will be sent when the connection is back/);

    // The student reloads the page; the new connection finds the server well again.
    await page.reload();
    const key = await participantKey(sessionId, playerIds[0]);
    await expect
      .poll(async () =>
        (
          await testDb()
            .select()
            .from(choices)
            .where(and(eq(choices.sessionId, sessionId), eq(choices.participantKey, key!)))
        ).map((r) => `${r.action} ${r.source}`),
      )
      .toEqual(['C player']);
    await expect.poll(() => text(page)).toMatch(/You chose ◆ ?Cooperate/);
    expect(pageErrors.splice(0)).toEqual([]);
  });

  it('says plainly when the round closed before a kept tap could be sent, and what the timeout rule chose', async () => {
    // Seed 2 draws 14 after round 1 (≤ 50): the supergame goes on, round 1 stays in the history.
    const design = { roundSeconds: 8, supergames: 1, delta: 0.5, timeout: 'defect' as const, labels: { C: 'Cooperate', D: 'Defect' } };
    const { sessionId, instructor, players, playerIds } = await outboxClass(2, design, { seed: '2' });
    const { page } = await phoneOf(players[0]);
    const sent: string[] = [];
    let toPage: ((frame: string) => void) | null = null;
    await page.routeWebSocket(/\/socket\.io\//, (ws) => {
      const server = ws.connectToServer();
      toPage = (frame) => ws.send(frame);
      ws.onMessage((frame) => {
        if (String(frame).includes('"choice:submit"')) sent.push(String(frame));
        server.send(frame);
      });
    });
    await page.goto(`/play/${sessionId}`);
    await page.getByRole('heading', { name: 'You are in' }).waitFor();
    await expect.poll(async () => /\bconnected\b/.test(await text(page))).toBe(true);
    const partner = await connect(players[1].cookieHeader());
    expect((await partner.timeout(8000).emitWithAck('session:watch', { sessionId, as: 'participant' })).ok).toBe(true);
    const staff = await connect(instructor.cookieHeader());
    expect((await staff.timeout(8000).emitWithAck('session:control', { sessionId, command: 'start' })).ok).toBe(true);
    await page.getByTestId('round-title').waitFor();
    toPage!(`42${JSON.stringify(['storage:status', { ok: false }])}`);
    await page.getByRole('button', { name: 'Cooperate' }).click();
    expect(
      (
        await partner
          .timeout(8000)
          .emitWithAck('choice:submit', { sessionId, supergame: 1, round: 1, action: 'C', clientChoiceId: 'partner-1-1-abc' })
      ).ok,
    ).toBe(true);

    await expect
      .poll(() => text(page), { timeout: 20_000 })
      .toMatch(
        'Round 1 closed before your choice Cooperate reached the server, so it was not recorded. The timeout rule chose Defect for you.',
      );
    await page.screenshot({ path: path.join(SHOTS, 'phone-round-closed-first.png') });
    await expect.poll(() => page.getByTestId('round-title').textContent()).toContain('Round 2');
    toPage!(`42${JSON.stringify(['storage:status', { ok: true }])}`);
    await expect.poll(async () => /\bconnected\b/.test(await text(page))).toBe(true);
    await new Promise((r) => setTimeout(r, 1000));
    // The dropped tap is not sent into the next round, and round 1 holds the timeout rule's choice.
    expect(sent).toEqual([]);
    const key = await participantKey(sessionId, playerIds[0]);
    const rows = await testDb()
      .select()
      .from(choices)
      .where(and(eq(choices.sessionId, sessionId), eq(choices.participantKey, key!)));
    expect(rows.map((r) => `${r.round} ${r.action} ${r.source}`)).toEqual(['1 D timeout']);
    expect(await page.getByRole('button', { name: 'Cooperate' }).isEnabled()).toBe(true);
    expect(pageErrors.splice(0)).toEqual([]);
  });
});
