// Every page through axe-core (WCAG 2.1 A and AA rules), at desktop and phone sizes, as each role
// sees it: signed out, participant, assistant, instructor (and the site admin's one page). Any
// violation fails the test, listed with its page, size and the elements axe points at.
import { createRequire } from 'node:module';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { contextAs, DESKTOP, launch, pageErrors, PHONE } from '#tests/helpers/browser';
import { closeTestDb, createCourse, createCourseCreator, createUser } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { closeSockets, createDesign, join, openSession } from '#tests/helpers/live';
import { libraryStrategy } from '#app/lib/automata';
import { AXELROD_PAYOFFS } from '#app/lib/league-design';
import { addHouseEntry, createLeague, getLeague, leagueStatus, saveEntry, setLeagueState, startLeagueRun } from '#app/models/league.server';
import { closeDb } from '#app/utils/db.server';

const AXE = createRequire(import.meta.url).resolve('axe-core/axe.min.js');
const TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'];
const SIZES = [
  [DESKTOP, 'desktop'],
  [PHONE, 'phone'],
] as const;

let browser: Browser;
const world = {} as {
  courseId: number;
  designId: number;
  sessionId: number;
  code: string;
  leagueId: number;
  instructor: Client;
  assistant: Client;
  participant: Client;
  newcomer: Client;
  /** a strategy league taking entries, and one with published results (the participant has an entry in both) */
  openLeague: number;
  publishedLeague: number;
};

beforeAll(async () => {
  browser = await launch();
  const [inst, asst, part, newcomer] = [
    uniqueEmail('a11y-inst'),
    uniqueEmail('a11y-asst'),
    uniqueEmail('a11y-part'),
    uniqueEmail('a11y-new'),
  ];
  // the instructor may create courses, so /courses/new is the form (not a 403)
  const [instId, asstId, partId, newId] = await Promise.all([
    createCourseCreator(inst),
    createUser(asst, 'Assia Assistant'),
    createUser(part),
    createUser(newcomer),
  ]);
  world.courseId = await createCourse('Accessible course', [
    { userId: instId, role: 'instructor' },
    { userId: asstId, role: 'assistant' },
    { userId: partId, role: 'participant' },
    { userId: newId, role: 'participant' },
  ]);
  world.designId = await createDesign(world.courseId, instId, { supergames: 2, delta: 0.75, roundSeconds: 60, consent: true });
  [world.instructor, world.assistant, world.participant, world.newcomer] = await Promise.all([
    signIn(inst),
    signIn(asst),
    signIn(part),
    signIn(newcomer),
  ]);
  // a strategy league that has run: its staff pages, results included
  const league = await createLeague(world.courseId, instId, {
    title: 'Accessible league',
    design: { payoffs: { ...AXELROD_PAYOFFS }, delta: 0.9, epsilon: 0.01, matches: 4, generations: 30, seed: 1 },
    deadline: null,
  });
  world.leagueId = league.id;
  for (const s of ['TFT', 'ALLD', 'Grim']) await addHouseEntry(world.courseId, league.id, s);
  await saveEntry(league.id, partId, { name: 'Team A', automaton: libraryStrategy('WSLS') });
  await setLeagueState(world.courseId, league.id, ['open'], 'closed');
  await startLeagueRun(world.courseId, league.id);
  for (let t = 0; t < 300 && (await getLeague(world.courseId, league.id))?.runStatus !== 'done'; t++)
    await new Promise((r) => setTimeout(r, 100));
  const opened = await openSession(world.instructor, world.courseId, world.designId);
  world.sessionId = opened.sessionId;
  world.code = opened.code;
  await join(world.participant, world.code, { consent: 'yes' });
  const design = { payoffs: { ...AXELROD_PAYOFFS }, delta: 0.9, epsilon: 0, matches: 0, generations: 50, seed: 1 };
  const [open, published] = await Promise.all(
    ['Open league', 'Published league'].map((title) => createLeague(world.courseId, instId, { title, design, deadline: null })),
  );
  world.openLeague = open.id;
  world.publishedLeague = published.id;
  for (const l of [open, published]) await saveEntry(l.id, partId, { name: 'My copycat', automaton: libraryStrategy('TFT') });
  await addHouseEntry(world.courseId, published.id, 'ALLD');
  await setLeagueState(world.courseId, published.id, ['open'], 'closed');
  await startLeagueRun(world.courseId, published.id);
  for (let t = 0; t < 300 && (await leagueStatus(world.courseId, published.id))?.runStatus !== 'done'; t++)
    await new Promise((r) => setTimeout(r, 100));
  await setLeagueState(world.courseId, published.id, ['run'], 'published');
}, 120_000);
afterAll(async () => {
  closeSockets();
  await browser?.close();
  await closeTestDb();
  await closeDb();
});

/** Waits for what each kind of page draws after hydration, so axe sees the page people see. */
async function settle(page: Page) {
  await page.waitForLoadState('load');
  if (await page.locator('figure[data-chart]').count()) await page.locator('figure[data-chart] .recharts-surface').first().waitFor();
  if (/\/(floor|sessions\/\d+|screen\/|play\/)/.test(page.url()))
    await page.waitForFunction(() => !/Connecting/.test(document.body.innerText), undefined, { timeout: 15_000 });
  await page.waitForTimeout(200);
}

interface Violation {
  page: string;
  size: string;
  rule: string;
  targets: string;
}

async function audit(client: Client | null, paths: string[]): Promise<Violation[]> {
  const found: Violation[] = [];
  for (const [size, sizeName] of SIZES) {
    // axe is injected as a script tag: the pages' CSP (nonces) would refuse it.
    const ctx = await contextAs(browser, client, size, { bypassCSP: true });
    const page = await ctx.newPage();
    for (const path of paths) {
      await page.goto(path);
      await settle(page);
      await page.addScriptTag({ path: AXE });
      const violations = await page.evaluate(async (tags) => {
        const axe = window.axe;
        if (!axe) throw new Error('axe-core did not load');
        const r = await axe.run(document, { runOnly: { type: 'tag', values: tags }, resultTypes: ['violations'] });
        return r.violations.map((v) => ({
          rule: v.id,
          targets: v.nodes
            .map((n) => n.target.join(' '))
            .slice(0, 3)
            .join(' | '),
        }));
      }, TAGS);
      for (const v of violations) found.push({ page: path, size: sizeName, ...v });
      // every page has a title (axe's document-title rule checks it too; error pages had none)
      if (!(await page.title())) found.push({ page: path, size: sizeName, rule: 'no <title>', targets: 'head' });
    }
    await ctx.close();
  }
  return found;
}

describe('axe-core, WCAG 2.1 AA, every page at desktop and phone sizes', () => {
  it('signed out', async () => {
    expect(await audit(null, ['/', '/sign-in', '/join', `/join/${world.code}`, '/no-such-page'])).toEqual([]);
  }, 180_000);

  it('a participant', async () => {
    const participant = await audit(world.participant, [
      '/',
      '/account',
      `/play/${world.sessionId}`,
      `/play/leagues/${world.openLeague}`,
      `/play/leagues/${world.publishedLeague}`,
    ]);
    // the instructions and consent page of someone who has not joined yet
    const newcomer = await audit(world.newcomer, [`/join/${world.code}`]);
    // a participant of the demo's completed session reads their own summary
    const demo = await audit(await signIn('student01@halvorsen.example'), ['/courses/1/debrief/1/mine']);
    expect([...participant, ...newcomer, ...demo]).toEqual([]);
  }, 240_000);

  it('an assistant', async () => {
    const c = world.courseId;
    const own = await audit(world.assistant, [
      `/courses/${c}`,
      `/courses/${c}/sessions`,
      `/courses/${c}/sessions/${world.sessionId}`,
      `/courses/${c}/sessions/${world.sessionId}/floor`,
      `/courses/${c}/designs/${world.designId}`,
    ]);
    const demo = await audit(await signIn('j.lindqvist@halvorsen.example'), ['/courses/1/debrief', '/courses/1/debrief/2', '/methods']);
    expect([...own, ...demo]).toEqual([]);
  }, 240_000);

  it('an instructor (and the site admin)', async () => {
    const c = world.courseId;
    const s = world.sessionId;
    const own = await audit(world.instructor, [
      '/courses',
      '/courses/new',
      `/courses/${c}`,
      `/courses/${c}/members`,
      `/courses/${c}/designs`,
      `/courses/${c}/designs/new`,
      `/courses/${c}/designs/${world.designId}`,
      `/courses/${c}/sessions`,
      `/courses/${c}/sessions/${s}`,
      `/courses/${c}/sessions/${s}/floor`,
      `/screen/${s}`,
      `/courses/${c}/leagues/${world.publishedLeague}/reveal`,
      `/courses/${c}/data`,
      `/courses/${c}/roster`,
      `/courses/${c}/datasets`,
      `/courses/${c}/leagues`,
      `/courses/${c}/leagues/new`,
      `/courses/${c}/leagues/${world.leagueId}`,
      `/courses/${c}/leagues/${world.leagueId}/results`,
      '/settings/tokens',
      '/account',
      // not found inside the staff shell: a course that does not exist
      '/courses/999999999',
      // not for this role: the site admin's page (403), inside the staff shell
      '/admin',
    ]);
    const demo = await audit(await signIn('r.okafor@halvorsen.example'), [
      '/courses/1/debrief/1',
      '/courses/1/debrief/compare?sessions=1,2',
      '/courses/1/debrief/projector?sessions=1,2',
      '/courses/1/sessions/1/results',
      '/methods',
    ]);
    const admin = await audit(await signIn('admin@halvorsen.example'), ['/admin']);
    expect([...own, ...demo, ...admin]).toEqual([]);
  }, 420_000);

  it('left no page error behind', () => {
    expect(pageErrors).toEqual([]);
  });
});
