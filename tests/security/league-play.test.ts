// The participant's league page (/play/leagues/:id) and the staff reveal
// (/courses/:courseId/leagues/:id/reveal), attacked as a hostile student would: someone else's
// course, another course's league id, saving after the deadline or after the close, broken and
// oversized strategies, a forged cookie, another origin, and the reveal asked for by a participant.
// Every refusal stores nothing.
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { libraryStrategy } from '#app/lib/automata';
import { AXELROD_PAYOFFS, type LeagueDesign } from '#app/lib/league-design';
import { toStrategyFile } from '#app/lib/strategy-file';
import { createLeague, leagueStatus, setLeagueState, startLeagueRun } from '#app/models/league.server';
import { closeDb } from '#app/utils/db.server';
import { leagueEntries, leagues } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';

const design: LeagueDesign = { payoffs: { ...AXELROD_PAYOFFS }, delta: 0.9, epsilon: 0, matches: 0, generations: 40, seed: 3 };
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

let courseId: number;
let otherCourseId: number;
let instructorId: number;
let studentId: number;
let instructor: Client;
let assistant: Client;
let researcher: Client;
let student: Client;
let classmate: Client;
let outsider: Client;
let otherInstructor: Client;
let studentEmail: string;

beforeAll(async () => {
  const emails = {
    instructor: uniqueEmail('lp-inst'),
    assistant: uniqueEmail('lp-asst'),
    researcher: uniqueEmail('lp-res'),
    student: uniqueEmail('lp-stud'),
    classmate: uniqueEmail('lp-mate'),
    outsider: uniqueEmail('lp-out'),
    otherInstructor: uniqueEmail('lp-oinst'),
  };
  studentEmail = emails.student;
  const ids = Object.fromEntries(
    await Promise.all(Object.entries(emails).map(async ([k, e]) => [k, await createUser(e, `Name ${k}`)] as const)),
  ) as Record<keyof typeof emails, number>;
  instructorId = ids.instructor;
  studentId = ids.student;
  courseId = await createCourse('League play course', [
    { userId: ids.instructor, role: 'instructor' },
    { userId: ids.assistant, role: 'assistant' },
    { userId: ids.researcher, role: 'researcher' },
    { userId: ids.student, role: 'participant' },
    { userId: ids.classmate, role: 'participant' },
  ]);
  otherCourseId = await createCourse('Another course', [
    { userId: ids.otherInstructor, role: 'instructor' },
    { userId: ids.outsider, role: 'participant' },
  ]);
  [instructor, assistant, researcher, student, classmate, outsider, otherInstructor] = await Promise.all(
    [emails.instructor, emails.assistant, emails.researcher, emails.student, emails.classmate, emails.outsider, emails.otherInstructor].map(
      (e) => signIn(e),
    ),
  );
});

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

const entryForm = (name: string, strategy: unknown = toStrategyFile(libraryStrategy('TFT'))) => ({
  name,
  strategy: typeof strategy === 'string' ? strategy : JSON.stringify(strategy),
});

async function entriesOf(leagueId: number) {
  return testDb()
    .select({
      userId: leagueEntries.userId,
      name: leagueEntries.name,
      strategy: leagueEntries.strategy,
      updatedAt: leagueEntries.updatedAt,
    })
    .from(leagueEntries)
    .where(eq(leagueEntries.leagueId, leagueId));
}

async function newLeague(title: string, deadline: Date | null = null, course = courseId) {
  return (await createLeague(course, instructorId, { title, design, deadline })).id;
}

describe('the participant league page', () => {
  it('a participant of the course enters a strategy and revises it; the page shows it saved', async () => {
    const id = await newLeague('Open league');
    const page = await student.get(`/play/leagues/${id}`);
    expect(page.status).toBe(200);
    expect(pageText(await page.text())).toContain('Open league');
    const res = await student.post(`/play/leagues/${id}`, entryForm('Copycat'));
    expect(res.status).toBe(200);
    let rows = await entriesOf(id);
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ userId: studentId, name: 'Copycat' });
    expect(rows[0].strategy.states.map((s) => s.plays)).toEqual(['C', 'D']);
    // Revised: the same entry, changed.
    expect((await student.post(`/play/leagues/${id}`, entryForm('Grudger', toStrategyFile(libraryStrategy('Grim'))))).status).toBe(200);
    rows = await entriesOf(id);
    expect(rows).toHaveLength(1);
    expect(rows[0].name).toBe('Grudger');
    const text = pageText(await (await student.get(`/play/leagues/${id}`)).text());
    expect(text).toContain('Your entry is in');
    expect(text).toContain('Grudger');
    // The home page lists it with the way back in.
    expect(pageText(await (await student.get('/')).text())).toContain('Revise your strategy');
  });

  it('someone who is not a participant of the course gets a 404 and stores nothing', async () => {
    const id = await newLeague('Private league');
    expect((await outsider.get(`/play/leagues/${id}`)).status).toBe(404);
    expect((await outsider.post(`/play/leagues/${id}`, entryForm('Intruder'))).status).toBe(404);
    // Staff of the course are not entrants either: the page is for participants.
    expect((await instructor.post(`/play/leagues/${id}`, entryForm('Staff entry'))).status).toBe(404);
    // A league id of another course, by a participant of this one.
    const elsewhere = await newLeague('Elsewhere', null, otherCourseId);
    expect((await student.get(`/play/leagues/${elsewhere}`)).status).toBe(404);
    expect((await student.post(`/play/leagues/${elsewhere}`, entryForm('Wanderer'))).status).toBe(404);
    // Ids that are not ids, and ones that do not exist.
    expect((await student.get('/play/leagues/abc')).status).toBe(404);
    expect((await student.get('/play/leagues/999999999')).status).toBe(404);
    expect(await entriesOf(id)).toEqual([]);
    expect(await entriesOf(elsewhere)).toEqual([]);
    // The other course's home lists only its own leagues.
    const home = pageText(await (await outsider.get('/')).text());
    expect(home).toContain('Elsewhere');
    expect(home).not.toContain('Private league');
  });

  it('after the deadline a save is refused with a clear message and the saved entry stays as it was', async () => {
    const id = await newLeague('Deadline league', new Date(Date.now() + 60_000));
    expect((await student.post(`/play/leagues/${id}`, entryForm('Before'))).status).toBe(200);
    const before = await entriesOf(id);
    await testDb()
      .update(leagues)
      .set({ deadline: new Date(Date.now() - 1000) })
      .where(eq(leagues.id, id));
    const res = await student.post(`/play/leagues/${id}`, entryForm('After', toStrategyFile(libraryStrategy('ALLD'))));
    expect(res.status).toBe(409);
    const text = pageText(await res.text());
    expect(text).toContain('The deadline for entries has passed. Nothing was saved.');
    expect(await entriesOf(id)).toEqual(before);
    // A classmate with no entry cannot slip one in either.
    expect((await classmate.post(`/play/leagues/${id}`, entryForm('Late'))).status).toBe(409);
    expect(await entriesOf(id)).toHaveLength(1);
    // The page says the deadline has passed and shows the entry read-only (no form).
    const page = await (await student.get(`/play/leagues/${id}`)).text();
    expect(pageText(page)).toContain('the deadline');
    expect(page).not.toContain('name="strategy"');
  });

  it('after the instructor closes entries a save is refused and nothing changes', async () => {
    const id = await newLeague('Closing league');
    expect((await student.post(`/play/leagues/${id}`, entryForm('Kept'))).status).toBe(200);
    const before = await entriesOf(id);
    expect((await setLeagueState(courseId, id, ['open'], 'closed'))?.ok).toBe(true);
    const res = await student.post(`/play/leagues/${id}`, entryForm('Changed'));
    expect(res.status).toBe(409);
    expect(pageText(await res.text())).toContain('This league no longer takes entries. Nothing was saved.');
    expect(await entriesOf(id)).toEqual(before);
  });

  it('broken, oversized and forged strategies get field errors and store nothing', async () => {
    const id = await newLeague('Validation league');
    const unreachable = { ...toStrategyFile(libraryStrategy('ALLC')), states: [] as unknown[] };
    unreachable.states = [
      { state: 1, plays: 'C', next: { CC: 1, CD: 1, DC: 1, DD: 1 } },
      { state: 2, plays: 'D', next: { CC: 2, CD: 2, DC: 2, DD: 2 } },
    ];
    const cases: [string, Record<string, string>, string][] = [
      ['unreachable state', entryForm('U', unreachable), 'State 2 cannot be reached from the starting state 1.'],
      ['not JSON', entryForm('J', '{"format": "parley-strategy", '), 'Your strategy could not be read.'],
      [
        'seven states',
        entryForm('Seven', {
          ...toStrategyFile(libraryStrategy('ALLC')),
          states: Array.from({ length: 7 }, (_, i) => ({ state: i + 1, plays: 'C', next: { CC: ((i + 1) % 7) + 1, CD: 1, DC: 1, DD: 1 } })),
        }),
        'A league entry may have at most 6 states (this one has 7).',
      ],
      ['not our format', entryForm('F', { format: 'other', states: [] }), '"format" must be "parley-strategy".'],
      ['no name', entryForm('   '), 'Give your entry a name.'],
      ['long name', entryForm('x'.repeat(61)), 'Keep the name to 60 characters.'],
      ['no strategy', { name: 'N' }, 'Pick a starting point and build your strategy before saving.'],
      ['50 KB strategy', { name: 'Big', strategy: 'x'.repeat(50_000) }, 'far larger than any league entry'],
    ];
    for (const [what, form, message] of cases) {
      const res = await student.post(`/play/leagues/${id}`, form);
      expect(res.status, what).toBe(400);
      expect(pageText(await res.text()), what).toContain(message);
    }
    // Past the 64 KB body cap (docs/security.md): refused before it is parsed.
    expect((await student.post(`/play/leagues/${id}`, { name: 'Huge', strategy: 'x'.repeat(200_000) })).status).toBe(413);
    expect(await entriesOf(id)).toEqual([]);
  });

  it('a forged cookie is sent to sign in, and a post from another origin is refused', async () => {
    const id = await newLeague('Cookie league');
    const forged = await fetch(new URL(`/play/leagues/${id}`, student.base), {
      headers: { cookie: '__parley_auth=forged.value' },
      redirect: 'manual',
    });
    expect(forged.status).toBe(302);
    expect(forged.headers.get('location')).toContain('/sign-in');
    const foreign = await fetch(new URL(`/play/leagues/${id}`, student.base), {
      method: 'POST',
      headers: { cookie: student.cookieHeader(), 'content-type': 'application/x-www-form-urlencoded', origin: 'https://evil.example' },
      body: new URLSearchParams(entryForm('Foreign')),
      redirect: 'manual',
    });
    expect(foreign.status).toBe(403);
    expect(await entriesOf(id)).toEqual([]);
  });
});

async function runLeague(id: number) {
  expect((await setLeagueState(courseId, id, ['open'], 'closed'))?.ok).toBe(true);
  expect((await startLeagueRun(courseId, id))?.ok).toBe(true);
  for (let t = 0; t < 300; t++) {
    const s = await leagueStatus(courseId, id);
    if (s?.runStatus === 'done' || s?.runStatus === 'failed') {
      expect(s.runStatus).toBe('done');
      return;
    }
    await sleep(100);
  }
  throw new Error('the league run did not finish in 30 s');
}

describe('results and the staff reveal', () => {
  it('results reach participants only once published, with their own entry marked; the reveal is for instructors and assistants', async () => {
    const id = await newLeague('Reveal league');
    expect((await student.post(`/play/leagues/${id}`, entryForm('Tit for tat fan'))).status).toBe(200);
    expect((await classmate.post(`/play/leagues/${id}`, entryForm('Hawk', toStrategyFile(libraryStrategy('ALLD'))))).status).toBe(200);
    const reveal = `/courses/${courseId}/leagues/${id}/reveal`;
    // Not run yet: nothing to reveal.
    expect((await instructor.get(reveal)).status).toBe(409);
    await runLeague(id);

    // Run, not published: staff may reveal it in class; participants see no results yet.
    const page = await instructor.get(reveal);
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain('Tit for tat fan');
    expect(html).toContain('Hawk');
    // Aggregates only: no e-mail address of an entrant reaches the projector.
    expect(html).not.toContain(studentEmail);
    expect(html).not.toMatch(/lp-(stud|mate)/);
    expect((await assistant.get(reveal)).status).toBe(200);
    expect((await researcher.get(reveal)).status).toBe(403);
    expect((await student.get(reveal)).status).toBe(403);
    expect((await otherInstructor.get(reveal)).status).toBe(403);
    // This league's id under another course's URL.
    expect((await otherInstructor.get(`/courses/${otherCourseId}/leagues/${id}/reveal`)).status).toBe(404);
    expect(pageText(await (await student.get(`/play/leagues/${id}`)).text())).not.toContain('Ranking');

    expect((await setLeagueState(courseId, id, ['run'], 'published'))?.ok).toBe(true);
    const text = pageText(await (await student.get(`/play/leagues/${id}`)).text());
    // Two entries at δ = 0.9, Axelrod's payoffs [calc]: TFT earns 3 against itself and
    // 0.9·1 = 0.9 against ALLD (mean 1.95); ALLD earns 0.1·5 + 0.9·1 = 1.4 against TFT and 1
    // against itself (mean 1.2). TFT ranks first.
    expect(text).toMatch(/Your entry “Tit for tat fan” ranked 1 of 2, with 1\.95 points per round/);
    expect(text).toContain('Evolution');
    expect(pageText(await (await classmate.get(`/play/leagues/${id}`)).text())).toMatch(/ranked 2 of 2, with 1\.20/);
    expect(pageText(await (await student.get('/')).text())).toContain('See the results');
  });
});
