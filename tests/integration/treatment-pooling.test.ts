// Treatments are their frozen parameters, not their names (issue 10): the side-by-side Debrief and
// the estimation on sessions group by identity, refuse to pool sessions that share a name but ran
// different games, and on request show them as separate groups, each with its own δ and sizeBAD.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { EstimateStatus } from '#app/models/estimate.server';
import { closeDb } from '#app/utils/db.server';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { waitEstimate } from '#tests/helpers/estimates';
import { baseUrl, type Client, pageText, signIn, uniqueEmail } from '#tests/helpers/http';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

let courseId: number;
let instructor: Client;
const ids = { a: 0, b: 0, c: 0, d: 0 };
const removers: (() => Promise<void>)[] = [];

afterAll(async () => {
  for (const r of removers) await r();
  await closeTestDb();
  await closeDb();
});

beforeAll(async () => {
  const email = uniqueEmail('pool-inst');
  const userId = await createUser(email);
  courseId = await createCourse('Pooling course', [{ userId, role: 'instructor' }]);
  instructor = await signIn(email);
  // Payoffs of Dal Bó & Fréchette (2011), R = 40. A and B share a name but not δ; C has another
  // name and A's parameters (a copy of the design, say).
  const make = async (treatment: string, delta: number, seed: number, R = 40) => {
    const s = await insertSyntheticSession(testDb(), {
      courseId,
      createdBy: userId,
      participants: 6,
      lengths: [3, 1, 4, 2, 2, 3],
      design: { delta, payoffs: { R, S: 12, T: 50, P: 25 } },
      treatment,
      seed,
    });
    removers.push(s.remove);
    return s.sessionId;
  };
  ids.a = await make('Baseline', 0.75, 11);
  ids.b = await make('Baseline', 0.5, 12);
  ids.c = await make('Baseline (copy)', 0.75, 13);
  ids.d = await make('Low reward', 0.75, 14, 32);
});

const compare = (sessions: number[], extra = '') =>
  instructor.get(`/courses/${courseId}/debrief/compare?sessions=${sessions.join(',')}${extra}`);

/** The rows of the "per treatment" table as text, one string per row. */
function treatmentRows(html: string): string[] {
  const table = /<table[^>]*>[\s\S]*?Cooperation and strategy shares per treatment[\s\S]*?<\/table>/.exec(html)?.[0] ?? '';
  return [...table.matchAll(/<tr[^>]*>([\s\S]*?)<\/tr>/g)].slice(1).map((m) => pageText(m[1]).trim());
}

describe('the side-by-side Debrief', () => {
  it('refuses to pool sessions that share a name but ran different treatments, and says how to see them apart', async () => {
    const res = await compare([ids.a, ids.b]);
    expect(res.status).toBe(409);
    const html = await res.text();
    const text = pageText(html);
    expect(text).toContain(
      `Sessions called “Baseline” ran different treatments (#${ids.a}: R40 S12 T50 P25, δ = 0.75, random termination; #${ids.b}: R40 S12 T50 P25, δ = 0.5, random termination), so they cannot be pooled.`,
    );
    expect(html).toContain(`treatments=separate`);
    expect(text).toContain('Show them as separate treatments');
  });

  it('on request shows them as separate groups, each with its own δ and sizeBAD', async () => {
    const res = await compare([ids.a, ids.b], '&treatments=separate');
    expect(res.status).toBe(200);
    const html = await res.text();
    const rows = treatmentRows(html);
    expect(rows).toHaveLength(2);
    // Source: sizeBAD at R = 40 is 13/48 at δ = 3/4 and 13/18 at δ = 1/2 (methods.md §1 table).
    expect(rows[0]).toMatch(/^Baseline R40 S12 T50 P25, δ = 0\.75, random termination #\d+ 0\.75 0\.271 /);
    expect(rows[1]).toMatch(/^Baseline R40 S12 T50 P25, δ = 0\.5, random termination #\d+ 0\.5 0\.722 /);
    expect(pageText(html)).toContain('shown as separate treatments');
  });

  it('pools sessions of one treatment whatever their names', async () => {
    const res = await compare([ids.a, ids.c]);
    expect(res.status).toBe(200);
    const rows = treatmentRows(await res.text());
    expect(rows).toHaveLength(1);
    expect(rows[0]).toContain('Baseline / Baseline (copy)');
    expect(rows[0]).toContain(`#${ids.a}, #${ids.c}`);
  });

  it('reads each session against the sizeBAD curve and thresholds of its own payoffs', async () => {
    const text = pageText(await (await compare([ids.a, ids.d])).text());
    expect(text).toContain(
      `Curves: sizeBAD for each payoff set, each session read against its own (R40 S12 T50 P25: #${ids.a}; R32 S12 T50 P25: #${ids.d})`,
    );
    // Source: methods.md §1 table — sizeBAD 13/48 (R = 40) and 13/16 (R = 32) at δ = 3/4.
    const rows = treatmentRows(await (await compare([ids.a, ids.d])).text());
    expect(rows.map((r) => /δ = 0\.75, random termination #\d+ 0\.75 (0\.\d+)/.exec(r)?.[1])).toEqual(['0.271', '0.813']);
    // sessions of one payoff set share one curve
    expect(pageText(await (await compare([ids.a, ids.b], '&treatments=separate')).text())).toContain(
      'Curve: sizeBAD, the size of the basin',
    );
  });
});

describe('the estimation on sessions', () => {
  const start = (sessions: number[], extra: Record<string, string> = {}) =>
    instructor.post(`/courses/${courseId}/estimates`, {
      sessions: sessions.join(','),
      windowKind: 'all',
      preset: 'dbf2011',
      bootstrap: 0,
      seed: 1,
      ...extra,
    });

  it('refuses to pool sessions that share a name but not their parameters (409), and nothing is queued', async () => {
    const res = await start([ids.a, ids.b]);
    expect(res.status).toBe(409);
    const body = (await res.json()) as { ok: boolean; code: string; message: string };
    expect(body.ok).toBe(false);
    expect(body.code).toBe('mixed_treatments');
    expect(body.message).toContain('Sessions called “Baseline” ran different treatments');
  });

  it('estimates them as separate groups on request, and pools one treatment under different names', async () => {
    const separate = await start([ids.a, ids.b], { treatments: 'separate' });
    expect(separate.status).toBe(202);
    const e1 = await waitEstimate(instructor, courseId, ((await separate.json()) as { estimate: EstimateStatus }).estimate.id);
    expect(e1.status).toBe('done');
    expect(e1.result!.groups.map((g) => [g.group, g.sessions])).toEqual([
      ['Baseline — R40 S12 T50 P25, δ = 0.5, random termination', [String(ids.b)]],
      ['Baseline — R40 S12 T50 P25, δ = 0.75, random termination', [String(ids.a)]],
    ]);

    const pooled = await start([ids.a, ids.c]);
    expect(pooled.status).toBe(202);
    const e2 = await waitEstimate(instructor, courseId, ((await pooled.json()) as { estimate: EstimateStatus }).estimate.id);
    expect(e2.status).toBe('done');
    expect(e2.result!.groups).toHaveLength(1);
    expect(e2.result!.groups[0].group).toBe('Baseline / Baseline (copy) — R40 S12 T50 P25, δ = 0.75, random termination');
    expect(e2.result!.groups[0].subjects).toBe(12);
  });
});

describe('the API', () => {
  it('gives each session its treatment identity beside its name', async () => {
    const made = await instructor.post('/settings/tokens', { intent: 'create', name: 'pooling', courseId });
    const token = /prl_[A-Za-z0-9_-]{43}/.exec(await made.text())![0];
    const res = await fetch(new URL(`/api/v1/courses/${courseId}/sessions?limit=10`, baseUrl()), {
      headers: { authorization: `Bearer ${token}` },
    });
    expect(res.status).toBe(200);
    const { data } = (await res.json()) as {
      data: { id: number; treatment: string; treatment_key: string; treatment_parameters: string }[];
    };
    const byId = new Map(data.map((s) => [s.id, s]));
    expect(byId.get(ids.a)).toMatchObject({
      treatment: 'Baseline',
      treatment_key: 'R=40;S=12;T=50;P=25;delta=0.75;termination=standard;matching=random-rematch',
      treatment_parameters: 'R40 S12 T50 P25, δ = 0.75, random termination',
    });
    expect(byId.get(ids.c)!.treatment_key).toBe(byId.get(ids.a)!.treatment_key);
    expect(byId.get(ids.b)!.treatment_key).not.toBe(byId.get(ids.a)!.treatment_key);
  });
});
