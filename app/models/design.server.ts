import { and, asc, eq, isNull } from 'drizzle-orm';
import { type Automaton } from '#app/lib/automata';
import { type Design, designSchema } from '#app/lib/design';
import { db } from '#app/utils/db.server';
import { courseStrategies, designs } from '#drizzle/schema';

export interface DesignRow {
  id: number;
  name: string;
  params: Design;
  updatedAt: Date;
  archivedAt: Date | null;
}

/** Stored params are re-validated on the way out, so a design always reads as a valid Design. */
function toRow(r: { id: number; name: string; params: unknown; updatedAt: Date; archivedAt: Date | null }): DesignRow {
  return { ...r, params: designSchema.parse(r.params) };
}

const columns = { id: designs.id, name: designs.name, params: designs.params, updatedAt: designs.updatedAt, archivedAt: designs.archivedAt };

export async function listDesigns(courseId: number) {
  const rows = await db().select(columns).from(designs).where(eq(designs.courseId, courseId)).orderBy(asc(designs.name));
  return rows.map(toRow);
}

export async function getDesign(courseId: number, designId: number): Promise<DesignRow | null> {
  const [r] = await db()
    .select(columns)
    .from(designs)
    .where(and(eq(designs.courseId, courseId), eq(designs.id, designId)));
  return r ? toRow(r) : null;
}

export async function createDesign(courseId: number, userId: number, name: string, params: Design) {
  const [res] = await db().insert(designs).values({ courseId, name, params, createdBy: userId });
  return res.insertId;
}

export async function updateDesign(courseId: number, designId: number, name: string, params: Design) {
  const [res] = await db()
    .update(designs)
    .set({ name, params, updatedAt: new Date() })
    .where(and(eq(designs.courseId, courseId), eq(designs.id, designId), isNull(designs.archivedAt)));
  return res.affectedRows > 0;
}

export async function duplicateDesign(courseId: number, designId: number, userId: number) {
  const d = await getDesign(courseId, designId);
  if (!d) return null;
  return createDesign(courseId, userId, `${d.name} (copy)`.slice(0, 120), d.params);
}

export async function setDesignArchived(courseId: number, designId: number, archived: boolean) {
  const [res] = await db()
    .update(designs)
    .set({ archivedAt: archived ? new Date() : null })
    .where(and(eq(designs.courseId, courseId), eq(designs.id, designId)));
  return res.affectedRows > 0;
}

export async function listCourseStrategies(courseId: number): Promise<Automaton[]> {
  const rows = await db()
    .select({ code: courseStrategies.code, name: courseStrategies.name, states: courseStrategies.states })
    .from(courseStrategies)
    .where(eq(courseStrategies.courseId, courseId))
    .orderBy(asc(courseStrategies.code));
  return rows.map((r) => ({ id: r.code, name: r.name, states: r.states as Automaton['states'] }));
}

export type SaveStrategyResult = { ok: true } | { ok: false; field: string; message: string };

export async function saveCourseStrategy(courseId: number, userId: number, a: Automaton): Promise<SaveStrategyResult> {
  const [dup] = await db()
    .select({ id: courseStrategies.id })
    .from(courseStrategies)
    .where(and(eq(courseStrategies.courseId, courseId), eq(courseStrategies.code, a.id)));
  if (dup) return { ok: false, field: 'id', message: `This course already has a strategy called ${a.id}. Choose another short name.` };
  await db().insert(courseStrategies).values({ courseId, code: a.id, name: a.name, states: a.states, createdBy: userId });
  return { ok: true };
}
