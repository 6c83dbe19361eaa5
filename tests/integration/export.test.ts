import { and, asc, eq } from 'drizzle-orm';
import { unzipSync, strFromU8 } from 'fflate';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { IDENTIFIED_COLUMNS, PANEL_CODEBOOK, PANEL_COLUMNS } from '#app/lib/panel-codebook';
import { choices, courses, exportLog, sessionParticipants, sessions, supergameDraws, users } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

/**
 * The panel as the database holds it, computed here independently of app/models: every stored
 * choice of a participant with the partner's choice of the same seat-round, sorted by join order,
 * supergame and round.
 */
async function expectedPanel(sessionId: number, { identified = false } = {}) {
  const [s] = await testDb().select().from(sessions).where(eq(sessions.id, sessionId));
  const design = s.params as { payoffs: { R: number; S: number; T: number; P: number }; delta: number };
  const people = await testDb()
    .select({
      key: sessionParticipants.participantKey,
      pseudonym: sessionParticipants.pseudonym,
      seq: sessionParticipants.seq,
      consent: sessionParticipants.consent,
    })
    .from(sessionParticipants)
    .where(eq(sessionParticipants.sessionId, sessionId));
  const all = await testDb().select().from(choices).where(eq(choices.sessionId, sessionId));
  const draws = new Map(
    (await testDb().select().from(supergameDraws).where(eq(supergameDraws.sessionId, sessionId))).map((d) => [d.supergame, d]),
  );
  const cell = new Map(all.map((c) => [`${c.supergame}/${c.round}/${c.pairId}/${c.seat}`, c]));
  const who = new Map(people.map((p) => [p.key, p]));
  const table = { CC: design.payoffs.R, CD: design.payoffs.S, DC: design.payoffs.T, DD: design.payoffs.P };
  // seats a computer chose in at least once (odd-count partner or hand-over)
  const computerSeats = new Set(all.filter((c) => c.source === 'computer').map((c) => `${c.supergame}/${c.pairId}/${c.seat}`));
  const rows = [];
  for (const c of all) {
    if (c.participantKey === null) continue;
    const me = who.get(c.participantKey)!;
    if (!identified && me.consent === 0) continue;
    const o = cell.get(`${c.supergame}/${c.round}/${c.pairId}/${1 - c.seat}`);
    if (!o) continue;
    rows.push({
      seq: me.seq,
      row: {
        session: sessionId,
        treatment: s.treatment,
        ...design.payoffs,
        delta: design.delta,
        pseudonym: me.pseudonym,
        partner: o.participantKey === null || o.source === 'computer' ? `computer:${o.strategy}` : who.get(o.participantKey)!.pseudonym,
        supergame: c.supergame,
        round: c.round,
        action: c.action,
        partner_action: o.action,
        payoff: table[`${c.action}${o.action}`],
        source: c.source,
        decision_ms: c.decisionMs,
        draw: draws.get(c.supergame)!.draws[c.round - 1],
        supergame_length: draws.get(c.supergame)!.length,
        timestamp: new Date(c.atMs).toISOString(),
        paid: c.round <= draws.get(c.supergame)!.length ? 1 : 0,
        origin:
          c.round > draws.get(c.supergame)!.length
            ? 'unpaid_round'
            : c.source === 'timeout'
              ? 'timeout'
              : c.source === 'computer'
                ? 'computer_seat'
                : 'own',
        partner_source: o.source,
        computer_partner: computerSeats.has(`${c.supergame}/${c.pairId}/${1 - c.seat}`) ? 1 : 0,
      },
    });
  }
  rows.sort((a, b) => a.seq - b.seq || a.row.supergame - b.row.supergame || a.row.round - b.row.round);
  return rows.map((r) => r.row);
}

// papaparse would turn ISO timestamps into Date objects; keep them as the text the file holds
const parseCsv = (text: string) =>
  Papa.parse<Record<string, unknown>>(text, { header: true, dynamicTyping: (column) => column !== 'timestamp', skipEmptyLines: true });

let instructor: Client;
let researcher: Client;
let assistant: Client;
let courseId: number;
let otherCourseId: number;
let synthetic: Awaited<ReturnType<typeof insertSyntheticSession>>;
let second: Awaited<ReturnType<typeof insertSyntheticSession>>;
let demoSessionId: number;

beforeAll(async () => {
  const emails = { instructor: uniqueEmail('instr'), researcher: uniqueEmail('res'), assistant: uniqueEmail('ta') };
  const ids = {
    instructor: await createUser(emails.instructor, 'Export Instructor'),
    researcher: await createUser(emails.researcher),
    assistant: await createUser(emails.assistant),
  };
  courseId = await createCourse('Export course', [
    { userId: ids.instructor, role: 'instructor' },
    { userId: ids.researcher, role: 'researcher' },
    { userId: ids.assistant, role: 'assistant' },
  ]);
  otherCourseId = await createCourse('Another course', [{ userId: ids.instructor, role: 'instructor' }]);
  // 5 people (odd: a disclosed computer partner each supergame); P-002 declined research consent,
  // P-003 agreed, the others were not asked. Paid, to exercise the rounding.
  synthetic = await insertSyntheticSession(testDb(), {
    courseId,
    createdBy: ids.instructor,
    participants: 5,
    lengths: [3, 1, 4],
    consent: (i) => (i === 1 ? 0 : i === 2 ? 1 : null),
    enrol: true,
    design: { credit: { kind: 'paid', showUpFee: 5, ratePerPoint: 0.013, currency: 'EUR', rounding: 0.25 } },
    seed: 11,
  });
  second = await insertSyntheticSession(testDb(), { courseId, createdBy: ids.instructor, participants: 4, lengths: [2, 2], seed: 12 });
  const [demo] = await testDb()
    .select({ id: sessions.id })
    .from(sessions)
    .innerJoin(courses, eq(courses.id, sessions.courseId))
    .where(and(eq(courses.isDemo, true), eq(sessions.simulated, true)))
    .orderBy(asc(sessions.id));
  demoSessionId = demo.id;
  [instructor, researcher, assistant] = await Promise.all([signIn(emails.instructor), signIn(emails.researcher), signIn(emails.assistant)]);
});

afterAll(async () => {
  await synthetic?.remove();
  await second?.remove();
  await closeTestDb();
});

describe('choice panel downloads', () => {
  it('CSV parses back (papaparse) to the rows in the database, in R/pandas-friendly form', async () => {
    const res = await researcher.get(`/courses/${courseId}/data/panel?session=${synthetic.sessionId}&format=csv`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toContain('text/csv');
    expect(res.headers.get('content-disposition')).toBe(`attachment; filename="parley-session-${synthetic.sessionId}-panel.csv"`);
    const text = await res.text();
    const lines = text.trimEnd().split('\n');
    // a header line, no index column, plain \n line ends
    expect(lines[0]).toBe(PANEL_COLUMNS.join(','));
    expect(text).not.toContain('\r');
    const parsed = parseCsv(text);
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual(PANEL_COLUMNS);
    expect(parsed.data).toEqual(await expectedPanel(synthetic.sessionId));
    // `.` decimals and ISO 8601 timestamps (UTC) as the codebook says
    expect(lines[1].split(',')[6]).toBe('0.75');
    for (const r of parsed.data) expect(String(r.timestamp)).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);
    // the disclosed computer partner is named, with its strategy
    expect(parsed.data.some((r) => r.partner === 'computer:TFT')).toBe(true);
  });

  it('the demo session’s whole panel comes back row for row, and JSON carries the same rows', async () => {
    // this test's researcher is no member of the demo course
    expect((await researcher.get(`/courses/1/data/panel?session=${demoSessionId}`)).status).toBe(403);
    const demoResearcher = await signIn('m.achterberg@halvorsen.example');
    const res = await demoResearcher.get(`/courses/1/data/panel?session=${demoSessionId}&format=csv`);
    expect(res.status).toBe(200);
    const parsed = parseCsv(await res.text());
    const expected = await expectedPanel(demoSessionId);
    expect(parsed.data.length).toBe(expected.length);
    expect(parsed.data).toEqual(expected);
    const json = (await (await demoResearcher.get(`/courses/1/data/panel?session=${demoSessionId}&format=json`)).json()) as unknown[];
    expect(json).toEqual(expected);
  });

  it('is de-identified: no personal field, and nobody who declined research consent', async () => {
    const text = await (await researcher.get(`/courses/${courseId}/data/panel?session=${synthetic.sessionId}&format=json`)).text();
    const rows = JSON.parse(text) as Record<string, unknown>[];
    expect(Object.keys(rows[0]).sort()).toEqual([...PANEL_COLUMNS].sort());
    for (const field of ['name', 'email', 'student_id', 'ip', 'user_id', 'participant_key'])
      expect(Object.keys(rows[0])).not.toContain(field);
    const people = await testDb().select({ email: users.email, name: users.name, id: users.id }).from(users);
    for (const p of people.filter((p) => synthetic.userIds.includes(p.id))) {
      expect(text).not.toContain(p.email);
      expect(text).not.toContain(p.name!);
    }
    expect(text).not.toMatch(/SYN-/); // student ids
    expect(text).not.toMatch(/"participant_key"|\b\d+\.\d+\.\d+\.\d+\b/); // keys, IP addresses
    // P-002 declined: left out as a subject (they still appear as someone's partner)
    expect(rows.some((r) => r.pseudonym === 'P-002')).toBe(false);
    expect(rows.some((r) => r.pseudonym === 'P-003')).toBe(true);
  });

  it('several sessions download as a zip of panel.csv, codebook.csv and a README with the codebook', async () => {
    const res = await researcher.get(
      `/courses/${courseId}/data/panel?session=${synthetic.sessionId}&session=${second.sessionId}&format=zip`,
    );
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/zip');
    const files = unzipSync(new Uint8Array(await res.arrayBuffer()));
    expect(Object.keys(files).sort()).toEqual(['README.md', 'codebook.csv', 'panel.csv']);
    const panel = parseCsv(strFromU8(files['panel.csv']));
    expect(panel.data).toEqual([...(await expectedPanel(synthetic.sessionId)), ...(await expectedPanel(second.sessionId))]);
    const codebook = Papa.parse<Record<string, string>>(strFromU8(files['codebook.csv']), { header: true, skipEmptyLines: true }).data;
    expect(codebook.map((c) => c.column)).toEqual(PANEL_COLUMNS);
    const readme = strFromU8(files['README.md']);
    for (const c of PANEL_CODEBOOK) expect(readme).toContain(`| ${c.column} | ${c.type} |`);
    expect(readme).toContain('De-identified');
  });

  it('refuses unknown sessions, sessions of other courses, bad input and the wrong roles', async () => {
    expect((await researcher.get(`/courses/${courseId}/data/panel?session=999999`)).status).toBe(404);
    expect((await instructor.get(`/courses/${otherCourseId}/data/panel?session=${synthetic.sessionId}`)).status).toBe(404);
    expect((await researcher.get(`/courses/${courseId}/data/panel`)).status).toBe(400);
    expect((await researcher.get(`/courses/${courseId}/data/panel?session=${synthetic.sessionId}&format=xlsx`)).status).toBe(400);
    expect((await assistant.get(`/courses/${courseId}/data/panel?session=${synthetic.sessionId}`)).status).toBe(403);
    expect((await researcher.get(`/courses/${courseId}/data/codebook.csv`)).status).toBe(200);
  });

  it('the Data page lists the completed sessions; researchers see no identified export, assistants no page', async () => {
    const forResearcher = pageText(await (await researcher.get(`/courses/${courseId}/data`)).text());
    expect(forResearcher).toContain(`CSV panel of session ${synthetic.sessionId}`);
    expect(forResearcher).not.toContain('Identified export');
    const forInstructor = pageText(await (await instructor.get(`/courses/${courseId}/data`)).text());
    expect(forInstructor).toContain('Identified export (instructors only)');
    expect((await assistant.get(`/courses/${courseId}/data`)).status).toBe(403);
  });
});

describe('identified export and credit sheet (instructors only, logged)', () => {
  const logCount = async (kind: string) =>
    (
      await testDb()
        .select()
        .from(exportLog)
        .where(and(eq(exportLog.courseId, courseId), eq(exportLog.kind, kind)))
    ).length;

  it('refuses the identified export to researchers and assistants, and without the confirmation', async () => {
    const form = { session: synthetic.sessionId, format: 'csv', confirm: 'yes' };
    expect((await researcher.post(`/courses/${courseId}/data/panel`, form)).status).toBe(403);
    expect((await assistant.post(`/courses/${courseId}/data/panel`, form)).status).toBe(403);
    const unconfirmed = await instructor.post(`/courses/${courseId}/data/panel`, { session: synthetic.sessionId, format: 'csv' });
    expect(unconfirmed.status).toBe(400);
    expect(await unconfirmed.text()).toContain('personal data');
    expect(await logCount('panel-identified')).toBe(0);
  });

  it('gives the instructor names, e-mails, student ids and consent, keeps those who declined, and logs it', async () => {
    const res = await instructor.post(`/courses/${courseId}/data/panel`, { session: synthetic.sessionId, format: 'csv', confirm: 'yes' });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-disposition')).toContain('IDENTIFIED');
    const parsed = parseCsv(await res.text());
    expect(parsed.meta.fields).toEqual(IDENTIFIED_COLUMNS);
    const expected = await expectedPanel(synthetic.sessionId, { identified: true });
    expect(parsed.data.map((r) => PANEL_COLUMNS.map((c) => r[c]))).toEqual(
      expected.map((r) => PANEL_COLUMNS.map((c) => r[c as keyof typeof r])),
    );
    const declined = parsed.data.find((r) => r.pseudonym === 'P-002')!;
    expect(declined).toMatchObject({ email: synthetic.emails[1], name: 'Synthetic Person 2', consent: 'no' });
    expect(String(declined.student_id)).toMatch(/^SYN-/);
    expect(parsed.data.find((r) => r.pseudonym === 'P-001')!.consent).toBe('not asked');
    expect(await logCount('panel-identified')).toBe(1);
  });

  it('credit sheet: points from the rounds that count, payout by the design’s rule, for the instructor alone', async () => {
    expect((await researcher.get(`/courses/${courseId}/sessions/${synthetic.sessionId}/credit.csv`)).status).toBe(403);
    expect((await assistant.get(`/courses/${courseId}/sessions/${synthetic.sessionId}/credit.csv`)).status).toBe(403);
    expect(await logCount('credit-sheet')).toBe(0);
    const res = await instructor.get(`/courses/${courseId}/sessions/${synthetic.sessionId}/credit.csv`);
    expect(res.status).toBe(200);
    const sheet = Papa.parse<Record<string, string>>(await res.text(), { header: true, skipEmptyLines: true });
    expect(sheet.meta.fields).toEqual(['student_id', 'name', 'email', 'pseudonym', 'points', 'payout', 'currency']);
    // consent plays no part: all five are there
    expect(sheet.data).toHaveLength(5);
    const rows = await expectedPanel(synthetic.sessionId, { identified: true });
    for (const line of sheet.data) {
      const points = rows.filter((r) => r.pseudonym === line.pseudonym).reduce((s, r) => s + r.payoff, 0);
      expect(Number(line.points)).toBe(points);
      // 5 EUR + points × 0.013, up to the next 0.25 (integers in cents to stay exact)
      const cents = 500 + points * 1.3;
      expect(line.payout).toBe((Math.ceil(cents / 25 - 1e-9) * 0.25).toFixed(2));
      expect(line.currency).toBe('EUR');
    }
    expect(await logCount('credit-sheet')).toBe(1);
    expect((await instructor.get(`/courses/${courseId}/sessions/999999/credit.csv`)).status).toBe(404);
  });
});
