import { count, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { designSchema } from '#app/lib/design';
import { fillInstructions } from '#app/lib/instructions';
import { courseStrategies, designs } from '#drizzle/schema';
import { closeTestDb, createCourse, createUser, testDb } from '#tests/helpers/db';
import { type Client, signIn, uniqueEmail } from '#tests/helpers/http';
import { designForm as form } from '#tests/helpers/live';

afterAll(closeTestDb);

const html = (s: string) => s.replaceAll('<!-- -->', '');

async function designCount(courseId: number) {
  const [{ n }] = await testDb().select({ n: count() }).from(designs).where(eq(designs.courseId, courseId));
  return n;
}

describe('the design editor', () => {
  let courseId: number;
  let otherCourseId: number;
  const emails = {
    instructor: uniqueEmail('d-inst'),
    assistant: uniqueEmail('d-asst'),
    researcher: uniqueEmail('d-res'),
    participant: uniqueEmail('d-part'),
  };
  const c = {} as Record<keyof typeof emails, Client>;

  beforeAll(async () => {
    const ids = {} as Record<keyof typeof emails, number>;
    for (const k of Object.keys(emails) as (keyof typeof emails)[]) ids[k] = await createUser(emails[k]);
    courseId = await createCourse('Design course', [
      { userId: ids.instructor, role: 'instructor' },
      { userId: ids.assistant, role: 'assistant' },
      { userId: ids.researcher, role: 'researcher' },
      { userId: ids.participant, role: 'participant' },
    ]);
    otherCourseId = await createCourse('Someone else’s course', [{ userId: await createUser(uniqueEmail('d-other')), role: 'instructor' }]);
    for (const k of Object.keys(emails) as (keyof typeof emails)[]) c[k] = await signIn(emails[k]);
  });

  it('refuses instructions with a placeholder the design cannot fill, beside the text, and saves nothing', async () => {
    const before = await designCount(courseId);
    const res = await c.instructor.post(
      `/courses/${courseId}/designs/new`,
      form({ instructions: 'Blocks of {blockRounds} rounds; chance {delta%}.' }),
    );
    expect(res.status).toBe(400);
    expect(html(await res.text())).toContain('{blockRounds} has no value in this design');
    expect(await designCount(courseId)).toBe(before);
  });

  it('creates a design with generated instructions and shows it to every staff role', async () => {
    const res = await c.instructor.post(`/courses/${courseId}/designs/new`, form());
    expect(res.status).toBe(302);
    const id = Number(/designs\/(\d+)/.exec(res.headers.get('location')!)![1]);
    const [row] = await testDb().select().from(designs).where(eq(designs.id, id));
    const params = row.params as { delta: number; instructions: string; payoffs: { T: number } };
    expect(params.delta).toBe(0.75);
    expect(params.payoffs.T).toBe(50);
    // Stored as a template (docs/decisions/028), filled from the parameters when a phone shows it.
    expect(params.instructions).toContain('If it is {drawCutoff} or less, you play another round');
    expect(fillInstructions(designSchema.parse(params))).toContain('If it is 75 or less, you play another round');
    for (const k of ['instructor', 'assistant', 'researcher'] as const) {
      expect((await c[k].get(`/courses/${courseId}/designs`)).status).toBe(200);
      expect((await c[k].get(`/courses/${courseId}/designs/${id}`)).status).toBe(200);
    }
    expect((await c.participant.get(`/courses/${courseId}/designs`)).status).toBe(403);
    expect((await c.participant.get(`/courses/${courseId}/designs/${id}`)).status).toBe(403);
  });

  it('wrong role → 403 and nothing saved', async () => {
    const before = await designCount(courseId);
    for (const k of ['assistant', 'researcher', 'participant'] as const) {
      expect((await c[k].post(`/courses/${courseId}/designs/new`, form())).status).toBe(403);
      expect((await c[k].get(`/courses/${courseId}/designs/new`)).status).toBe(403);
    }
    expect(await designCount(courseId)).toBe(before);
  });

  it('invalid payoffs → field errors beside the fields, typed values kept, nothing saved', async () => {
    const before = await designCount(courseId);
    const res = await c.instructor.post(`/courses/${courseId}/designs/new`, form({ 'payoffs.T': '35', delta: '1.2', name: 'Kept name' }));
    expect(res.status).toBe(400);
    const page = html(await res.text());
    expect(page).toContain('T (temptation) must be greater than R (reward)');
    expect(page).toContain('δ must be less than 1');
    const empty = await c.instructor.post(`/courses/${courseId}/designs/new`, form({ 'payoffs.P': '' }));
    expect(empty.status).toBe(400);
    expect(html(await empty.text())).toContain('P must be a number');
    expect(page).toContain('value="Kept name"');
    expect(page).toContain('value="35"');
    expect(page).toContain('nothing was saved');
    expect(await designCount(courseId)).toBe(before);
  });

  it('refuses a δ the draw cannot implement exactly (methods.md §8: no deception)', async () => {
    const res = await c.instructor.post(`/courses/${courseId}/designs/new`, form({ delta: '0.87501' }));
    expect(res.status).toBe(400);
    expect(html(await res.text())).toContain('Use at most four decimals for δ');
    const ok = await c.instructor.post(`/courses/${courseId}/designs/new`, form({ name: 'Seven eighths', delta: '0.875' }));
    expect(ok.status).toBe(302);
  });

  it('edits, duplicates and archives; an archived design cannot be edited', async () => {
    const res = await c.instructor.post(`/courses/${courseId}/designs/new`, form({ name: 'To archive' }));
    const id = Number(/designs\/(\d+)/.exec(res.headers.get('location')!)![1]);
    expect((await c.instructor.post(`/courses/${courseId}/designs/${id}`, form({ name: 'Renamed', delta: '0.5' }))).status).toBe(200);
    const [row] = await testDb().select().from(designs).where(eq(designs.id, id));
    expect(row.name).toBe('Renamed');
    expect((row.params as { delta: number }).delta).toBe(0.5);

    const before = await designCount(courseId);
    expect((await c.instructor.post(`/courses/${courseId}/designs`, { intent: 'duplicate', designId: id })).status).toBe(200);
    expect(await designCount(courseId)).toBe(before + 1);
    expect((await c.assistant.post(`/courses/${courseId}/designs`, { intent: 'archive', designId: id })).status).toBe(403);
    expect((await c.instructor.post(`/courses/${courseId}/designs`, { intent: 'archive', designId: id })).status).toBe(200);
    const locked = await c.instructor.post(`/courses/${courseId}/designs/${id}`, form({ name: 'Changed while archived' }));
    expect(locked.status).toBe(409);
    const [after] = await testDb().select().from(designs).where(eq(designs.id, id));
    expect(after.name).toBe('Renamed');
  });

  it('a design of another course is a 404, and so is an unknown one', async () => {
    const res = await c.instructor.post(`/courses/${courseId}/designs/new`, form({ name: 'Mine' }));
    const id = Number(/designs\/(\d+)/.exec(res.headers.get('location')!)![1]);
    expect((await c.instructor.get(`/courses/${courseId}/designs/999999`)).status).toBe(404);
    expect((await c.instructor.get(`/courses/${otherCourseId}/designs/${id}`)).status).toBe(403);
  });

  it('saves a strategy built in the checker; bad automata and wrong roles change nothing', async () => {
    const good = {
      id: 'Forgive2',
      name: 'Punish once, then forgive',
      states: [
        { action: 'C', next: { cc: 0, cd: 1, dc: 0, dd: 1 } },
        { action: 'D', next: { cc: 0, cd: 0, dc: 0, dd: 0 } },
      ],
    };
    const unreachable = { ...good, id: 'Lost', states: [...good.states, { action: 'D', next: { cc: 2, cd: 2, dc: 2, dd: 2 } }] };
    const strategies = async () => (await testDb().select().from(courseStrategies).where(eq(courseStrategies.courseId, courseId))).length;
    const bad = await c.instructor.post(`/courses/${courseId}/strategies`, { automaton: JSON.stringify(unreachable) });
    expect(bad.status).toBe(400);
    expect(await bad.text()).toContain('cannot be reached');
    expect((await c.instructor.post(`/courses/${courseId}/strategies`, { automaton: '{not json' })).status).toBe(400);
    expect((await c.instructor.post(`/courses/${courseId}/strategies`, { automaton: JSON.stringify({ ...good, id: 'TFT' }) })).status).toBe(
      400,
    );
    expect((await c.assistant.post(`/courses/${courseId}/strategies`, { automaton: JSON.stringify(good) })).status).toBe(403);
    expect(await strategies()).toBe(0);
    expect((await c.instructor.post(`/courses/${courseId}/strategies`, { automaton: JSON.stringify(good) })).status).toBe(200);
    expect(await strategies()).toBe(1);
    const again = await c.instructor.post(`/courses/${courseId}/strategies`, { automaton: JSON.stringify(good) });
    expect(again.status).toBe(400);
    expect(await strategies()).toBe(1);
  });
});
