// Strategy leagues, as a hostile student and a curious colleague would try them (written before the
// pages): staff pages and actions refuse participants; another course's league is not found under
// this course's address; ids that are not ids are "No such league."; assistants and researchers
// read but do not act; researchers never see participants' names; the API keeps tokens to their
// courses. (Entries themselves, the participant's side: tests/integration/league.test.ts refuses
// other courses, the deadline, a closed league and oversize automata at the model that every
// route saves through.)
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { libraryStrategy } from '#app/lib/automata';
import { AXELROD_PAYOFFS, type LeagueDesign } from '#app/lib/league-design';
import { addHouseEntry, createLeague, getLeague, listEntries, saveEntry, setLeagueState, startLeagueRun } from '#app/models/league.server';
import { closeDb } from '#app/utils/db.server';
import { leagues } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { baseUrl, type Client, signIn, uniqueEmail } from '#tests/helpers/http';

const design: LeagueDesign = { payoffs: { ...AXELROD_PAYOFFS }, delta: 0.9, epsilon: 0, matches: 0, generations: 20, seed: 3 };

let instructor: Client;
let assistant: Client;
let researcher: Client;
let student: Client;
let otherInstructor: Client;
let courseA: number;
let courseB: number;
let leagueA: number;
let studentId: number;
let instructorId: number;

beforeAll(async () => {
  const emails = {
    instructor: uniqueEmail('lgs-instr'),
    assistant: uniqueEmail('lgs-asst'),
    researcher: uniqueEmail('lgs-res'),
    student: uniqueEmail('lgs-stud'),
    other: uniqueEmail('lgs-other'),
  };
  instructorId = await createUser(emails.instructor);
  studentId = await createUser(emails.student, 'Grace Hopper');
  courseA = await createCourse('League security A', [
    { userId: instructorId, role: 'instructor' },
    { userId: await createUser(emails.assistant), role: 'assistant' },
    { userId: await createUser(emails.researcher), role: 'researcher' },
    { userId: studentId, role: 'participant' },
  ]);
  courseB = await createCourse('League security B', [{ userId: await createUser(emails.other), role: 'instructor' }]);
  leagueA = (await createLeague(courseA, instructorId, { title: 'Secure league', design, deadline: null })).id;
  await addHouseEntry(courseA, leagueA, 'ALLD');
  expect((await saveEntry(leagueA, studentId, { name: 'Grace Hopper', automaton: libraryStrategy('TFT') })).ok).toBe(true);
  [instructor, assistant, researcher, student, otherInstructor] = await Promise.all([
    signIn(emails.instructor),
    signIn(emails.assistant),
    signIn(emails.researcher),
    signIn(emails.student),
    signIn(emails.other),
  ]);
});

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

const pages = () => [
  `/courses/${courseA}/leagues`,
  `/courses/${courseA}/leagues/new`,
  `/courses/${courseA}/leagues/${leagueA}`,
  `/courses/${courseA}/leagues/${leagueA}/status`,
  `/courses/${courseA}/leagues/${leagueA}/export/entries.csv`,
  `/courses/${courseA}/leagues/${leagueA}/export/league.json`,
];

describe('a participant', () => {
  it('reaches no staff page of a league, nor its status, nor its files', async () => {
    for (const p of pages()) {
      const res = await student.get(p);
      expect(res.status, p).toBe(403);
      expect(await res.text()).not.toContain('Grace Hopper');
    }
  });

  it('cannot close, run, publish, add or remove entries, or create a league; nothing changes', async () => {
    const entriesBefore = await listEntries(leagueA);
    for (const fields of <Record<string, string | number>[]>[
      { intent: 'close' },
      { intent: 'run' },
      { intent: 'publish' },
      { intent: 'add-house', strategyId: 'ALLC' },
      { intent: 'remove', entryId: entriesBefore[0].id },
      { intent: 'deadline', deadline: '2020-01-01T00:00', tz: 0 },
    ]) {
      const res = await student.post(`/courses/${courseA}/leagues/${leagueA}`, fields);
      expect(res.status, String(fields.intent)).toBe(403);
    }
    const created = await student.post(`/courses/${courseA}/leagues/new`, {
      title: 'Mine',
      'payoffs.R': 3,
      'payoffs.S': 0,
      'payoffs.T': 5,
      'payoffs.P': 1,
      delta: 0.9,
      epsilon: 0,
      matches: 0,
      generations: 10,
      seed: 1,
    });
    expect(created.status).toBe(403);
    expect((await getLeague(courseA, leagueA))?.state).toBe('open');
    expect(await listEntries(leagueA)).toEqual(entriesBefore);
    expect(await testDb().select({ id: leagues.id }).from(leagues).where(eq(leagues.title, 'Mine'))).toEqual([]);
  });
});

describe('another course’s staff', () => {
  it('finds no league of course A under course B’s address, and gets 403 under course A’s', async () => {
    for (const p of [
      `/courses/${courseB}/leagues/${leagueA}`,
      `/courses/${courseB}/leagues/${leagueA}/status`,
      `/courses/${courseB}/leagues/${leagueA}/export/league.json`,
    ]) {
      const res = await otherInstructor.get(p);
      expect(res.status, p).toBe(404);
    }
    const acted = await otherInstructor.post(`/courses/${courseB}/leagues/${leagueA}`, { intent: 'close' });
    expect(acted.status).toBe(404);
    expect((await otherInstructor.get(`/courses/${courseA}/leagues/${leagueA}`)).status).toBe(403);
    expect((await getLeague(courseA, leagueA))?.state).toBe('open');
  });
});

describe('forged ids', () => {
  it('answers "No such league." for ids that are not positive whole numbers, and 404 for unknown files', async () => {
    for (const id of ['abc', '0', '-1', '1.5', '99999999999999999999', `${leagueA}%20OR%201=1`]) {
      const res = await instructor.get(`/courses/${courseA}/leagues/${id}`);
      expect(res.status, id).toBe(404);
    }
    expect((await instructor.get(`/courses/${courseA}/leagues/2147483647`)).status).toBe(404);
    expect((await instructor.get(`/courses/${courseA}/leagues/${leagueA}/export/..%2F..%2Fetc%2Fpasswd`)).status).toBe(404);
    expect((await instructor.get(`/courses/${courseA}/leagues/${leagueA}/export/results.csv`)).status).toBe(409);
    const removed = await instructor.post(`/courses/${courseA}/leagues/${leagueA}`, { intent: 'remove', entryId: 2147483647 });
    expect(removed.status).toBe(404);
    const junk = await instructor.post(`/courses/${courseA}/leagues/${leagueA}`, { intent: 'explode' });
    expect(junk.status).toBe(400);
  });
});

describe('the instructor', () => {
  it('changes the deadline only to a time in the future; a bad one changes nothing', async () => {
    const past = await instructor.post(`/courses/${courseA}/leagues/${leagueA}`, {
      intent: 'deadline',
      deadline: '2020-01-01T00:00',
      tz: 0,
    });
    expect(past.status).toBe(400);
    expect(await past.text()).toContain('The deadline must be in the future.');
    expect((await getLeague(courseA, leagueA))?.deadline).toBeNull();
    const next = new Date(Date.now() + 86_400_000).toISOString().slice(0, 16);
    const ok = await instructor.post(`/courses/${courseA}/leagues/${leagueA}`, { intent: 'deadline', deadline: next, tz: 0 });
    expect(ok.status).toBe(200);
    expect((await getLeague(courseA, leagueA))?.deadline?.toISOString().slice(0, 16)).toBe(next);
    await instructor.post(`/courses/${courseA}/leagues/${leagueA}`, { intent: 'deadline', deadline: '', tz: 0 });
    expect((await getLeague(courseA, leagueA))?.deadline).toBeNull();
  });
});

describe('assistants and researchers', () => {
  it('read the league but cannot act on it', async () => {
    for (const c of [assistant, researcher]) {
      expect((await c.get(`/courses/${courseA}/leagues/${leagueA}`)).status).toBe(200);
      expect((await c.post(`/courses/${courseA}/leagues/${leagueA}`, { intent: 'close' })).status).toBe(403);
      expect((await c.get(`/courses/${courseA}/leagues/new`)).status).toBe(403);
    }
    expect((await getLeague(courseA, leagueA))?.state).toBe('open');
  });

  it('researchers see participants’ entries as "Entry <id>", never their names; instructors see the names', async () => {
    const page = await (await researcher.get(`/courses/${courseA}/leagues/${leagueA}`)).text();
    expect(page).not.toContain('Grace Hopper');
    expect(page).toMatch(/Entry \d+/);
    const csv = await (await researcher.get(`/courses/${courseA}/leagues/${leagueA}/export/entries.csv`)).text();
    expect(csv).not.toContain('Grace Hopper');
    expect(csv).toContain('Always defect');
    const json = await (await researcher.get(`/courses/${courseA}/leagues/${leagueA}/export/league.json`)).text();
    expect(json).not.toContain('Grace Hopper');
    expect(await (await instructor.get(`/courses/${courseA}/leagues/${leagueA}`)).text()).toContain('Grace Hopper');
  });

  it('researchers see no names in the results and their files either', async () => {
    const ran = await createLeague(courseA, instructorId, { title: 'Ran league', design: { ...design, matches: 4 }, deadline: null });
    await addHouseEntry(courseA, ran.id, 'ALLD');
    expect((await saveEntry(ran.id, studentId, { name: 'Grace Hopper', automaton: libraryStrategy('Grim') })).ok).toBe(true);
    await setLeagueState(courseA, ran.id, ['open'], 'closed');
    expect((await startLeagueRun(courseA, ran.id))?.ok).toBe(true);
    for (let t = 0; t < 200 && (await getLeague(courseA, ran.id))?.runStatus !== 'done'; t++) await new Promise((r) => setTimeout(r, 100));
    const base = `/courses/${courseA}/leagues/${ran.id}`;
    for (const p of [
      `${base}/results`,
      `${base}/export/results.csv`,
      `${base}/export/matrix.csv`,
      `${base}/export/evolution.csv`,
      `${base}/export/league.json`,
    ]) {
      const res = await researcher.get(p);
      expect(res.status, p).toBe(200);
      expect(await res.text(), p).not.toContain('Grace Hopper');
    }
    expect(await (await instructor.get(`${base}/results`)).text()).toContain('Grace Hopper');
    // and participants reach none of it
    for (const p of [`${base}/results`, `${base}/export/results.csv`]) expect((await student.get(p)).status, p).toBe(403);
  });
});

describe('the API', () => {
  const api = (path: string, token?: string) =>
    fetch(new URL(`/api/v1${path}`, baseUrl()), { headers: token ? { authorization: `Bearer ${token}` } : {} });
  const tokenFor = async (client: Client, courseId: number) => {
    const res = await client.post('/settings/tokens', { intent: 'create', name: `league ${courseId}`, courseId });
    return /prl_[A-Za-z0-9_-]{43}/.exec(await res.text())![0];
  };

  it('keeps a token to its courses, answers JSON errors, and carries no names', async () => {
    const tokenA = await tokenFor(instructor, courseA);
    const tokenB = await tokenFor(otherInstructor, courseB);
    const list = await api(`/leagues?course=${courseA}`, tokenA);
    expect(list.status).toBe(200);
    const listed = (await list.json()) as { data: { id: number; entries: number }[] };
    expect(listed.data.find((l) => l.id === leagueA)).toMatchObject({ entries: 2 });

    const one = await api(`/leagues/${leagueA}`, tokenA);
    expect(one.status).toBe(200);
    const text = await one.text();
    expect(text).not.toContain('Grace Hopper');
    expect(JSON.parse(text)).toMatchObject({ data: { format: 'parley-league', league: { id: leagueA } } });

    const cases: [string, string | undefined, number, string][] = [
      [`/leagues/${leagueA}`, tokenB, 403, 'out_of_scope'],
      [`/leagues?course=${courseA}`, tokenB, 403, 'out_of_scope'],
      [`/leagues/${leagueA}`, undefined, 401, 'missing_token'],
      ['/leagues', tokenA, 400, 'bad_request'],
      ['/leagues/abc', tokenA, 404, 'not_found'],
      ['/leagues/2147483647', tokenA, 404, 'not_found'],
    ];
    for (const [path, token, status, code] of cases) {
      const res = await api(path, token);
      expect(res.status, path).toBe(status);
      expect(res.headers.get('content-type')).toContain('application/json');
      expect(((await res.json()) as { error: { code: string } }).error.code, path).toBe(code);
    }
  });

  it('pages a course’s leagues by id with a cursor, like every list of the API; a forged cursor or a huge limit is a 400', async () => {
    const token = await tokenFor(instructor, courseA);
    const more = [];
    for (const title of ['Paged league 2', 'Paged league 3'])
      more.push((await createLeague(courseA, instructorId, { title, design, deadline: null })).id);
    const seen: number[] = [];
    let cursor: string | null = null;
    for (let page = 0; page < 10; page++) {
      const res = await api(`/leagues?course=${courseA}&limit=1${cursor ? `&cursor=${cursor}` : ''}`, token);
      expect(res.status).toBe(200);
      const body = (await res.json()) as { data: { id: number; course_id: number }[]; next_cursor: string | null };
      expect(body.data.length).toBeLessThanOrEqual(1);
      seen.push(...body.data.map((l) => l.id));
      expect(body.data.every((l) => l.course_id === courseA)).toBe(true);
      cursor = body.next_cursor;
      if (!cursor) break;
    }
    expect(seen).toEqual([...seen].sort((a, b) => a - b));
    expect(new Set(seen).size).toBe(seen.length);
    expect(seen).toEqual(expect.arrayContaining([leagueA, ...more]));
    for (const [query, message] of [
      ['&limit=101', 'limit must be at most 100'],
      ['&cursor=bm90LW91cnM', 'cursor is not one this API gave out'],
    ]) {
      const res = await api(`/leagues?course=${courseA}${query}`, token);
      expect(res.status, query).toBe(400);
      expect(((await res.json()) as { error: { message: string } }).error.message).toContain(message);
    }
  });
});
