// Issue 9, finding 8: formula injection. Names people choose (a design's name frozen as a session's
// treatment, an uploaded dataset's treatments and session labels, participants' names) must never
// come back from a CSV download as a live spreadsheet formula. Every CSV Parley writes is fetched
// through the real server and read cell by cell.
// Source: OWASP, "CSV Injection" — cells beginning with = + - @ TAB or CR are prefixed with '.
import { strFromU8, unzipSync } from 'fflate';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CHART_IDS } from '#app/lib/debrief-tables';
import type { EstimateStatus } from '#app/models/estimate.server';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { waitEstimate } from '#tests/helpers/estimates';
import { baseUrl, type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

const HYPERLINK = '=HYPERLINK("http://evil.example","x")';
/** one session per payload; the multi-line one slips past papaparse's own escapeFormulae test */
const TREATMENTS = [HYPERLINK, '+1+1 plus', "-2+3+cmd|' /C calc'!A0", '@SUM(1,1)', '\t=1+1 tab', '\r=1+1 return', '=1+1\nsecond line'];
const NAMES = ['=HYPERLINK("http://evil.example/name","n")', '@name', '-1+1', '=1+1\nname'];

type Session = Awaited<ReturnType<typeof insertSyntheticSession>>;
let instructor: Client;
let researcher: Client;
let courseId: number;
const made: Session[] = [];

beforeAll(async () => {
  const instrEmail = uniqueEmail('instr');
  const resEmail = uniqueEmail('res');
  const instrId = await createUser(instrEmail);
  courseId = await createCourse('CSV injection course', [
    { userId: instrId, role: 'instructor' },
    { userId: await createUser(resEmail), role: 'researcher' },
  ]);
  for (const [i, treatment] of TREATMENTS.entries()) {
    made.push(
      await insertSyntheticSession(testDb(), {
        courseId,
        createdBy: instrId,
        participants: 4,
        lengths: [2, 3],
        seed: 900 + i,
        tag: `csvinj-${process.pid}-${Date.now().toString(36)}-${i}`,
        treatment,
        enrol: i === 0,
        name: (k) => NAMES[k],
        // a negative sucker payoff: a number column that must stay a number (-1, not '-1)
        design: { payoffs: { R: 3, S: -1, T: 4, P: 0 } },
      }),
    );
  }
  [instructor, researcher] = await Promise.all([signIn(instrEmail), signIn(resEmail)]);
});

afterAll(async () => {
  for (const s of made) await s.remove();
  await closeTestDb();
});

const cellsOf = (csv: string) => Papa.parse<string[]>(csv, { skipEmptyLines: true }).data.flat();

/**
 * No cell of the file may start a formula: = + @ TAB CR never lead a cell, and - only leads a
 * plain number. Every expected cell must be there, neutralised.
 */
function expectSafe(what: string, csv: string, expected: readonly string[]) {
  const cells = cellsOf(csv);
  expect(cells.length, what).toBeGreaterThan(0);
  const live = cells.filter((c) => /^[=+@\t\r]/.test(c) || (c.startsWith('-') && !/^-\d+(\.\d+)?$/.test(c)));
  expect(live, what).toEqual([]);
  for (const e of expected) expect(cells, `${what} holds ${JSON.stringify(e)}`).toContain(`'${e}`);
  return cells;
}

const ids = () => made.map((s) => s.sessionId);

describe('CSV downloads neutralise formulas (OWASP CSV Injection)', () => {
  it('panel CSV: every treatment neutralised, negative payoffs stay numbers', async () => {
    const res = await researcher.get(
      `/courses/${courseId}/data/panel?${ids()
        .map((id) => `session=${id}`)
        .join('&')}&format=csv`,
    );
    expect(res.status).toBe(200);
    const csv = await res.text();
    expectSafe('panel csv', csv, TREATMENTS);
    const rows = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true }).data;
    expect(rows.every((r) => r.S === '-1')).toBe(true);
    expect(rows.some((r) => r.payoff === '-1')).toBe(true);
  });

  it('panel zip: panel.csv and codebook.csv neutralised', async () => {
    const res = await researcher.get(
      `/courses/${courseId}/data/panel?${ids()
        .map((id) => `session=${id}`)
        .join('&')}&format=zip`,
    );
    expect(res.status).toBe(200);
    const files = unzipSync(new Uint8Array(await res.arrayBuffer()));
    expectSafe('zip panel.csv', strFromU8(files['panel.csv']), TREATMENTS);
    expectSafe('zip codebook.csv', strFromU8(files['codebook.csv']), []);
    expect(strFromU8(files['README.md'])).toContain('prefixed with a single quote');
  });

  it('identified export: names and treatments neutralised', async () => {
    const res = await instructor.post(`/courses/${courseId}/data/panel`, { session: made[0].sessionId, format: 'csv', confirm: 'yes' });
    expect(res.status).toBe(200);
    expectSafe('identified csv', await res.text(), [HYPERLINK, ...NAMES]);
  });

  it('API ?format=csv: treatment neutralised', async () => {
    const created = await researcher.post('/settings/tokens', { intent: 'create', name: 'csv injection', courseId });
    const token = /prl_[A-Za-z0-9_-]{43}/.exec(await created.text())?.[0];
    expect(token).toBeDefined();
    for (const s of made) {
      const res = await fetch(new URL(`/api/v1/sessions/${s.sessionId}/panel?format=csv`, baseUrl()), {
        headers: { authorization: `Bearer ${token}` },
      });
      expect(res.status).toBe(200);
      expectSafe(`api csv ${s.sessionId}`, await res.text(), [TREATMENTS[made.indexOf(s)]]);
    }
  });

  it('credit sheet: names neutralised', async () => {
    const res = await instructor.get(`/courses/${courseId}/sessions/${made[0].sessionId}/credit.csv`);
    expect(res.status).toBe(200);
    expectSafe('credit csv', await res.text(), NAMES);
  });

  it('codebook CSV and the Data page say how text cells are written', async () => {
    const res = await researcher.get(`/courses/${courseId}/data/codebook.csv`);
    expect(res.status).toBe(200);
    expectSafe('codebook csv', await res.text(), []);
    expect(await (await researcher.get(`/courses/${courseId}/data`)).text()).toContain('prefixed with a single quote');
  });

  it('every Debrief chart CSV over these sessions neutralises the treatments', async () => {
    for (const chart of CHART_IDS.filter((c) => c !== 'strategies')) {
      const res = await researcher.get(`/courses/${courseId}/debrief/csv/${chart}?sessions=${ids().join(',')}`);
      expect([chart, res.status]).toEqual([chart, 200]);
      expectSafe(`debrief ${chart}`, await res.text(), TREATMENTS);
    }
  });

  it('Debrief strategies CSV of an uploaded dataset neutralises its treatment and session labels', async () => {
    const header = 'session,treatment,pseudonym,partner,supergame,round,action,partner_action';
    const lines = [header];
    for (const [sg, len] of [
      [1, 3],
      [2, 2],
    ] as const)
      for (let r = 1; r <= len; r++)
        for (const [me, other] of [
          ['s1', 's2'],
          ['s2', 's1'],
          ['s3', 's4'],
          ['s4', 's3'],
        ])
          lines.push(['@lab', `"${HYPERLINK.replace(/"/g, '""')}"`, me, other, sg, r, (r + me.length) % 2 ? 'C' : 'D', 'C'].join(','));
    const form = new FormData();
    form.set('intent', 'upload');
    form.set('file', new File([lines.join('\n') + '\n'], 'evil.csv', { type: 'text/csv' }));
    const up = await researcher.postForm(`/courses/${courseId}/datasets`, form);
    expect(up.status).toBe(200);
    const page = await (await researcher.get(`/courses/${courseId}/datasets`)).text();
    const datasetId = Number(/datasets\/(\d+)\/estimate/.exec(page)?.[1]);
    expect(datasetId).toBeGreaterThan(0);
    const start = await researcher.post(`/courses/${courseId}/estimates`, {
      dataset: datasetId,
      windowKind: 'all',
      preset: 'dbf2011',
      bootstrap: 0,
      seed: 3,
    });
    expect([200, 202]).toContain(start.status);
    const { estimate } = (await start.json()) as { estimate: EstimateStatus };
    expect((await waitEstimate(researcher, courseId, estimate.id)).status).toBe('done');
    const res = await researcher.get(`/courses/${courseId}/debrief/csv/strategies?estimate=${estimate.id}`);
    expect(res.status).toBe(200);
    expectSafe('debrief strategies', await res.text(), [HYPERLINK, '@lab']);
  });
});
