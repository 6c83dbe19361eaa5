// Issue 9, finding 9: a valid upload under the limit must be stored. A 99,000-row panel (over
// 7 MB of CSV, under the 10 MB and 100,000-row limits) was one JSON value larger than MariaDB's
// max_allowed_packet, so the upload answered 500. Uploaded through the real page, estimated
// through the real server; the rows must come back complete and in the file's order.
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ChoiceRow } from '#app/lib/panel';
import { createDataset, DATASET_LIMITS, datasetChoiceRows } from '#app/models/datasets.server';
import type { EstimateStatus } from '#app/models/estimate.server';
import { closeDb } from '#app/utils/db.server';
import { datasets } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { waitEstimate } from '#tests/helpers/estimates';
import { type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';

const SUBJECTS = 300;
const SUPERGAMES = 30;
const ROUNDS = 11; // 300 × 30 × 11 = 99,000 rows

const subject = (i: number) => `subject-${String(i + 1).padStart(4, '0')}`;
const act = (i: number, g: number, r: number) => ((i * 7 + g * 13 + r * 3) % 5 < 3 ? 'C' : 'D');

/** A valid panel: in supergame g, a rotated perfect matching of the subjects, each round played. */
function bigPanel() {
  const lines = ['session,treatment,pseudonym,partner,supergame,round,action,partner_action'];
  const rows: Omit<ChoiceRow, 'line'>[] = [];
  for (let i = 0; i < SUBJECTS; i++)
    for (let g = 1; g <= SUPERGAMES; g++) {
      const p = (i + g) % SUBJECTS;
      const partner = ((p ^ 1) - g + SUBJECTS * 2) % SUBJECTS;
      for (let r = 1; r <= ROUNDS; r++) {
        const row = {
          session: `lab-${1 + (i % 3)}`,
          treatment: `Long-horizon treatment ${1 + (i % 3)}, high stakes`,
          subject: subject(i),
          partner: subject(partner),
          supergame: g,
          round: r,
          action: act(i, g, r),
          partnerAction: act(partner, g, r),
        } as const;
        rows.push(row);
        lines.push([row.session, `"${row.treatment}"`, row.subject, row.partner, g, r, row.action, row.partnerAction].join(','));
      }
    }
  return { csv: lines.join('\n') + '\n', rows };
}

let researcher: Client;
let researcherId: number;
let courseId: number;

beforeAll(async () => {
  const email = uniqueEmail('res');
  researcherId = await createUser(email);
  courseId = await createCourse('Big upload course', [
    { userId: await createUser(uniqueEmail('instr')), role: 'instructor' },
    { userId: researcherId, role: 'researcher' },
  ]);
  researcher = await signIn(email);
});

afterAll(async () => {
  await closeTestDb();
  await closeDb();
});

describe('uploaded panels of any size under the limit', () => {
  it('stores a 99,000-row, 7+ MB panel and estimates on every row, in order', { timeout: 120_000 }, async () => {
    const { csv, rows } = bigPanel();
    const bytes = Buffer.byteLength(csv);
    expect(rows).toHaveLength(99_000);
    expect(bytes).toBeGreaterThan(7 * 1024 * 1024);
    expect(bytes).toBeLessThan(DATASET_LIMITS.maxBytes);

    const form = new FormData();
    form.set('intent', 'upload');
    form.set('name', 'Big panel');
    form.set('file', new File([csv], 'big.csv', { type: 'text/csv' }));
    const res = await researcher.postForm(`/courses/${courseId}/datasets`, form);
    expect(res.status).toBe(200);
    expect(pageText(await res.text())).toContain('“Big panel” stored: 99,000 choices of 300 participants');

    const [d] = await testDb()
      .select({ id: datasets.id, rowCount: datasets.rowCount })
      .from(datasets)
      .where(eq(datasets.courseId, courseId));
    expect(d.rowCount).toBe(99_000);
    // the same rows, in the file's order
    expect(await datasetChoiceRows(courseId, d.id)).toEqual(rows);
    // and only through its own course
    expect(await datasetChoiceRows(courseId + 1_000_000, d.id)).toBeNull();

    const start = await researcher.post(`/courses/${courseId}/estimates`, {
      dataset: d.id,
      windowKind: 'all',
      preset: 'dbf2011',
      bootstrap: 0,
      seed: 5,
    });
    expect(start.status).toBe(202);
    const { estimate } = (await start.json()) as { estimate: EstimateStatus };
    const last = await waitEstimate(researcher, courseId, estimate.id, 90_000);
    expect(last.error).toBeNull();
    expect(last.status).toBe('done');
    const groups = last.result!.groups;
    expect(groups.map((g) => g.group).sort()).toEqual([1, 2, 3].map((k) => `Long-horizon treatment ${k}, high stakes`));
    expect(groups.reduce((s, g) => s + g.subjects, 0)).toBe(300);
    expect(groups.reduce((s, g) => s + g.choices, 0)).toBe(99_000);
  });

  it('stores all of a dataset or nothing: a bad row in a late batch leaves no trace', async () => {
    const rows: ChoiceRow[] = Array.from({ length: 12_000 }, (_, k) => ({
      session: 'S',
      treatment: 'T',
      subject: `s${k % 2}`,
      partner: `s${(k + 1) % 2}`,
      supergame: 1 + Math.floor(k / 2),
      round: 1,
      action: 'C',
      partnerAction: 'C',
    }));
    // beyond MariaDB's INT: the insert of the last batch fails after earlier batches were written
    rows[11_999] = { ...rows[11_999], supergame: 2 ** 40 };
    const before = await testDb().select({ id: datasets.id }).from(datasets).where(eq(datasets.courseId, courseId));
    await expect(createDataset(courseId, researcherId, 'Half', rows)).rejects.toThrow();
    const after = await testDb().select({ id: datasets.id }).from(datasets).where(eq(datasets.courseId, courseId));
    expect(after).toEqual(before);
  });
});
