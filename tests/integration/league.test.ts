// Strategy leagues against the real MariaDB and the test server's job worker: storage, the
// state machine's conditional moves, entries, and the run job end to end (a league of library
// house entries, whose stored ranking must be the lib's own standings(roundRobin(…))).
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LIBRARY, libraryStrategy } from '#app/lib/automata';
import { evolve, roundRobin, standings, survivors } from '#app/lib/league';
import { AXELROD_PAYOFFS, type LeagueDesign } from '#app/lib/league-design';
import { toStrategyFile } from '#app/lib/strategy-file';
import {
  addHouseEntry,
  createLeague,
  getLeague,
  leaguesForParticipant,
  leagueStatus,
  listEntries,
  listLeagues,
  participantLeague,
  removeEntry,
  saveEntry,
  setLeagueState,
  startLeagueRun,
} from '#app/models/league.server';
import { closeDb } from '#app/utils/db.server';
import { leagueEntries, leagues } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { uniqueEmail } from '#tests/helpers/http';

const design: LeagueDesign = { payoffs: { ...AXELROD_PAYOFFS }, delta: 0.9, epsilon: 0, matches: 0, generations: 50, seed: 7 };
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

let instructor: number;
let student: number;
let outsider: number;
let courseId: number;
let otherCourseId: number;

beforeAll(async () => {
  instructor = await createUser(uniqueEmail('lg-instr'));
  student = await createUser(uniqueEmail('lg-student'), 'Ada Student');
  outsider = await createUser(uniqueEmail('lg-outsider'));
  courseId = await createCourse('League course', [
    { userId: instructor, role: 'instructor' },
    { userId: student, role: 'participant' },
  ]);
  otherCourseId = await createCourse('Other league course', [
    { userId: instructor, role: 'instructor' },
    { userId: outsider, role: 'participant' },
  ]);
});

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

const TFT = libraryStrategy('TFT');

describe('league storage', () => {
  it('stores a league with its design, lists it in its course only, and validates the design on read', async () => {
    const l = await createLeague(courseId, instructor, { title: 'Storage league', design, deadline: null });
    expect(l).toMatchObject({ courseId, title: 'Storage league', state: 'open', results: null, runStatus: 'none' });
    expect(l.design).toEqual(design);
    expect((await listLeagues(courseId)).map((x) => x.id)).toContain(l.id);
    expect((await listLeagues(otherCourseId)).map((x) => x.id)).not.toContain(l.id);
    expect(await getLeague(otherCourseId, l.id)).toBeNull();

    // a row written some other way with a design that is not a prisoner's dilemma does not read
    const [res] = await testDb()
      .insert(leagues)
      .values({ courseId, title: 'Bad', createdBy: instructor, design: { ...design, payoffs: { R: 1, S: 0, T: 5, P: 3 } } });
    await expect(getLeague(courseId, res.insertId)).rejects.toThrow(/R \(reward\) must be greater than P/);
    await testDb().delete(leagues).where(eq(leagues.id, res.insertId));
  });

  it('moves states only from the states named: of two identical clicks, one moves it', async () => {
    const l = await createLeague(courseId, instructor, { title: 'Race league', design, deadline: null });
    const [a, b] = await Promise.all([
      setLeagueState(courseId, l.id, ['open'], 'closed'),
      setLeagueState(courseId, l.id, ['open'], 'closed'),
    ]);
    expect([a?.ok, b?.ok].sort()).toEqual([false, true]);
    const refused = [a, b].find((x) => x && !x.ok);
    expect(refused).toMatchObject({ ok: false, message: expect.stringMatching(/closed now/) });
    expect((await getLeague(courseId, l.id))?.closedAt).toBeInstanceOf(Date);
    // another course's id: nothing
    expect(await setLeagueState(otherCourseId, l.id, ['closed'], 'open')).toBeNull();
    expect((await getLeague(courseId, l.id))?.state).toBe('closed');
  });

  it('adds library strategies as labelled house entries, refuses unknown ones, removes entries before a run', async () => {
    const l = await createLeague(courseId, instructor, { title: 'House league', design, deadline: null });
    const added = await addHouseEntry(courseId, l.id, 'TFT');
    expect(added).toMatchObject({ ok: true, entry: { house: true, userId: null, name: TFT.name } });
    expect(await addHouseEntry(courseId, l.id, 'NOPE')).toMatchObject({ ok: false, message: expect.stringMatching(/not a strategy/) });
    expect(await addHouseEntry(otherCourseId, l.id, 'ALLD')).toBeNull();
    const entries = await listEntries(l.id);
    expect(entries).toHaveLength(1);
    expect(entries[0].strategy).toEqual(toStrategyFile(TFT));
    // forged: another course's league id, an entry of another league
    expect(await removeEntry(otherCourseId, l.id, entries[0].id)).toBeNull();
    const other = await createLeague(courseId, instructor, { title: 'Other', design, deadline: null });
    expect(await removeEntry(courseId, other.id, entries[0].id)).toBeNull();
    expect(await removeEntry(courseId, l.id, entries[0].id)).toEqual({ ok: true });
    expect(await listEntries(l.id)).toHaveLength(0);
  });
});

describe('participants’ entries', () => {
  it('saves and revises an entry while open; shows the league to participants of its course only', async () => {
    const l = await createLeague(courseId, instructor, { title: 'Entry league', design, deadline: new Date(Date.now() + 3600_000) });
    const first = await saveEntry(l.id, student, { name: 'Team Ada', automaton: TFT });
    expect(first).toMatchObject({ ok: true, entry: { name: 'Team Ada', house: false, userId: student } });
    const second = await saveEntry(l.id, student, { name: 'Team Ada', automaton: libraryStrategy('Grim') });
    expect(second.ok).toBe(true);
    const entries = await listEntries(l.id);
    expect(entries).toHaveLength(1);
    expect(entries[0].strategy.states).toEqual(toStrategyFile(libraryStrategy('Grim')).states);

    const mine = await participantLeague(l.id, student);
    expect(mine).toMatchObject({ league: { id: l.id, accepting: true, state: 'open' }, defaultName: 'Ada Student', results: null });
    expect(mine?.entry?.id).toBe(entries[0].id);
    expect(await participantLeague(l.id, outsider)).toBeNull();
    expect(await participantLeague(l.id, instructor)).toBeNull();
    const listed = await leaguesForParticipant(student);
    expect(listed.find((x) => x.id === l.id)).toMatchObject({ hasEntry: true, accepting: true });
    expect((await leaguesForParticipant(outsider)).some((x) => x.id === l.id)).toBe(false);
  });

  it('refuses an entry in a league of another course, after the deadline, or once closed, and stores nothing', async () => {
    const open = await createLeague(courseId, instructor, { title: 'Refusals', design, deadline: null });
    expect(await saveEntry(open.id, outsider, { name: 'Intruder', automaton: TFT })).toMatchObject({ ok: false, reason: 'not-found' });
    expect(await saveEntry(open.id, instructor, { name: 'Staff', automaton: TFT })).toMatchObject({ ok: false, reason: 'not-found' });
    expect(await saveEntry(999_999_999, student, { name: 'Nowhere', automaton: TFT })).toMatchObject({ ok: false, reason: 'not-found' });

    const past = await createLeague(courseId, instructor, { title: 'Past', design, deadline: new Date(Date.now() - 1000) });
    expect(await saveEntry(past.id, student, { name: 'Late', automaton: TFT })).toMatchObject({ ok: false, reason: 'past-deadline' });

    const closed = await createLeague(courseId, instructor, { title: 'Closed', design, deadline: null });
    await setLeagueState(courseId, closed.id, ['open'], 'closed');
    expect(await saveEntry(closed.id, student, { name: 'Closed', automaton: TFT })).toMatchObject({ ok: false, reason: 'not-open' });

    for (const id of [open.id, past.id, closed.id]) expect(await listEntries(id)).toHaveLength(0);
  });

  it('refuses invalid and oversize automata with a clear message, and stores nothing', async () => {
    const l = await createLeague(courseId, instructor, { title: 'Oversize', design, deadline: null });
    const seven = {
      id: 'x',
      name: 'x',
      states: Array.from({ length: 7 }, (_, i) => ({ action: 'C', next: { cc: (i + 1) % 7, cd: 0, dc: 0, dd: 0 } })),
    };
    const big = await saveEntry(l.id, student, { name: 'Big', automaton: seven });
    expect(big).toMatchObject({ ok: false, reason: 'invalid' });
    expect(big.ok === false && big.issues.map((i) => i.message).join(' ')).toMatch(/at most 6 states \(this one has 7\)/);

    const huge = { states: Array.from({ length: 100_000 }, () => ({ action: 'C', next: { cc: 0, cd: 0, dc: 0, dd: 0 } })) };
    const hugeRes = await saveEntry(l.id, student, { name: 'Huge', automaton: huge });
    expect(hugeRes.ok === false && hugeRes.issues[0].message).toMatch(/at most 6 states \(this one has 100000\)/);

    const broken = await saveEntry(l.id, student, { name: 'Broken', automaton: { states: [{ action: 'Z', next: { cc: 3 } }] } });
    expect(broken).toMatchObject({ ok: false, reason: 'invalid' });
    expect(await saveEntry(l.id, student, { name: '', automaton: TFT })).toMatchObject({
      ok: false,
      reason: 'invalid',
      issues: [{ path: 'name', message: 'Give your entry a name.' }],
    });
    expect(await saveEntry(l.id, student, { name: 'x'.repeat(61), automaton: TFT })).toMatchObject({ ok: false, reason: 'invalid' });
    expect(await saveEntry(l.id, student, { name: 'Null', automaton: null })).toMatchObject({ ok: false, reason: 'invalid' });
    expect(await listEntries(l.id)).toHaveLength(0);
  });
});

describe('the run job, end to end', () => {
  it('runs a league of the library strategies; the stored ranking is standings(roundRobin(…)) of the same entries', async () => {
    const l = await createLeague(courseId, instructor, {
      title: 'Library league',
      design: { ...design, matches: 20, seed: 11 },
      deadline: null,
    });
    for (const a of LIBRARY) expect((await addHouseEntry(courseId, l.id, a.id))?.ok).toBe(true);
    expect(await startLeagueRun(courseId, l.id)).toMatchObject({ ok: false, message: /Close the league/ });
    await setLeagueState(courseId, l.id, ['open'], 'closed');
    const started = await startLeagueRun(courseId, l.id);
    expect(started).toMatchObject({ ok: true });
    // a second click while it is queued or running queues nothing more
    const again = await startLeagueRun(courseId, l.id);
    expect(again?.ok === false && again.message).toMatch(/already being run|Close the league/);

    for (let t = 0; t < 300; t++) {
      const s = await leagueStatus(courseId, l.id);
      if (s?.runStatus === 'done' || s?.runStatus === 'failed') break;
      await sleep(100);
    }
    const ran = (await getLeague(courseId, l.id))!;
    expect(ran.runError).toBeNull();
    expect(ran).toMatchObject({ state: 'run', runStatus: 'done' });
    const results = ran.results!;
    expect(results.entries.map((e) => e.name)).toEqual(LIBRARY.map((a) => a.name));
    expect(results.entries.every((e) => e.house)).toBe(true);
    // the list says it has results without reading them
    expect((await listLeagues(courseId)).find((x) => x.id === l.id)).toMatchObject({
      hasResults: true,
      entries: LIBRARY.length,
      houseEntries: LIBRARY.length,
    });
    expect((await listLeagues(courseId)).find((x) => x.id === l.id)).not.toHaveProperty('results');

    // computed here from the lib directly, on the automata in the library's order (house entries
    // are listed in the order added). The lib's values are checked against an independent
    // ml-matrix solve at Axelrod's payoffs in tests/unit/league.test.ts ("a league of the library
    // strategies at Axelrod's payoffs"; Source: Axelrod (1984), p. 8 for T, R, P, S).
    const settings = { game: AXELROD_PAYOFFS, delta: 0.9, epsilon: 0 };
    const table = roundRobin(LIBRARY, settings);
    expect(results.perRound).toEqual(table);
    expect(results.standings).toEqual(standings(table));
    const evo = evolve(table, design.generations);
    expect(results.evolution).toEqual(evo);
    expect(results.survivors).toEqual(survivors(evo));
    // TFT against itself: R per round. Source: common practice (definition of TFT).
    const tft = LIBRARY.findIndex((a) => a.id === 'TFT');
    expect(results.perRound[tft][tft]).toBeCloseTo(AXELROD_PAYOFFS.R, 12);
    // the simulated version is there, with a standard error per entry
    expect(results.simulated?.matches).toBe(20);
    expect(results.simulated?.scores).toHaveLength(LIBRARY.length);
    expect(results.simulated!.scores.every((s) => s.se > 0)).toBe(true);
    // each simulated score lies within 4 standard errors of the exact one (seeded, so the same
    // every run). Source: common practice (a z-test; tests/unit/league.test.ts checks the pairs
    // themselves with a χ² test over many seeds).
    results.simulated!.scores.forEach((s, k) =>
      expect(Math.abs(s.score - results.standings.find((x) => x.entry === k)!.score)).toBeLessThan(4 * s.se),
    );

    // the results are a snapshot: removing an entry afterwards needs a reopen, which forgets them
    expect(await removeEntry(courseId, l.id, (await listEntries(l.id))[0].id)).toMatchObject({ ok: false });
    expect((await setLeagueState(courseId, l.id, ['run'], 'published'))?.ok).toBe(true);
    const reopened = await setLeagueState(courseId, l.id, ['closed', 'run'], 'open');
    expect(reopened?.ok).toBe(false);
    expect((await setLeagueState(courseId, l.id, ['published'], 'run'))?.ok).toBe(true);
    const back = await setLeagueState(courseId, l.id, ['closed', 'run'], 'open');
    expect(back).toMatchObject({ ok: true, league: { state: 'open', results: null, runStatus: 'none' } });
    await testDb().delete(leagueEntries).where(eq(leagueEntries.leagueId, l.id));
  });

  it('refuses to run a league with fewer than two entries', async () => {
    const l = await createLeague(courseId, instructor, { title: 'Lonely', design, deadline: null });
    await addHouseEntry(courseId, l.id, 'TFT');
    await setLeagueState(courseId, l.id, ['open'], 'closed');
    expect(await startLeagueRun(courseId, l.id)).toMatchObject({ ok: false, message: /at least two entries/ });
    expect(await startLeagueRun(otherCourseId, l.id)).toBeNull();
  });
});
