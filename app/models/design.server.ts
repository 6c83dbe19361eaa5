import { and, asc, count, eq, inArray, isNull, sql } from 'drizzle-orm';
import { type Automaton } from '#app/lib/automata';
import type { Design } from '#app/lib/design';
import { db } from '#app/utils/db.server';
import { courseStrategies, designs, sessions } from '#drizzle/schema';

export interface DesignRow {
  id: number;
  name: string;
  params: Design;
  version: number;
  previousId: number | null;
  updatedAt: Date;
  archivedAt: Date | null;
  /** sessions opened from this design; any makes it read-only (a new version is made instead) */
  sessionCount: number;
}

/** A stored design (its params validated by their column, drizzle/schema.ts) and its use. */
function toRow(r: Omit<DesignRow, 'sessionCount'>, sessionCount: number): DesignRow {
  return { ...r, sessionCount };
}

const columns = {
  id: designs.id,
  name: designs.name,
  params: designs.params,
  version: designs.version,
  previousId: designs.previousId,
  updatedAt: designs.updatedAt,
  archivedAt: designs.archivedAt,
};

/** Sessions per design (ids already scoped to a course by the caller). */
async function sessionCounts(designIds: number[]): Promise<Map<number, number>> {
  if (designIds.length === 0) return new Map();
  const rows = await db()
    .select({ designId: sessions.designId, n: count() })
    .from(sessions)
    .where(inArray(sessions.designId, designIds))
    .groupBy(sessions.designId);
  return new Map(rows.map((r) => [r.designId!, Number(r.n)]));
}

export async function listDesigns(courseId: number) {
  const rows = await db()
    .select(columns)
    .from(designs)
    .where(eq(designs.courseId, courseId))
    .orderBy(asc(designs.name), asc(designs.version));
  const used = await sessionCounts(rows.map((r) => r.id));
  return rows.map((r) => toRow(r, used.get(r.id) ?? 0));
}

export async function getDesign(courseId: number, designId: number): Promise<DesignRow | null> {
  const [r] = await db()
    .select(columns)
    .from(designs)
    .where(and(eq(designs.courseId, courseId), eq(designs.id, designId)));
  if (!r) return null;
  const used = await sessionCounts([r.id]);
  return toRow(r, used.get(r.id) ?? 0);
}

/** The version this design was made from, for "v2 of …" (same course only). */
export async function previousVersion(courseId: number, d: DesignRow): Promise<{ id: number; name: string; version: number } | null> {
  if (d.previousId === null) return null;
  const [p] = await db()
    .select({ id: designs.id, name: designs.name, version: designs.version })
    .from(designs)
    .where(and(eq(designs.courseId, courseId), eq(designs.id, d.previousId)));
  return p ?? null;
}

/** Newer versions made from this design, newest first. */
export async function laterVersions(courseId: number, designId: number) {
  return db()
    .select({ id: designs.id, name: designs.name, version: designs.version })
    .from(designs)
    .where(and(eq(designs.courseId, courseId), eq(designs.previousId, designId)))
    .orderBy(sql`${designs.version} desc`);
}

export async function createDesign(courseId: number, userId: number, name: string, params: Design) {
  const [res] = await db().insert(designs).values({ courseId, name, params, createdBy: userId });
  return res.insertId;
}

/**
 * Saves a design unless it is archived or a session has used it. The "not used" test is part of
 * the UPDATE, and opening a session locks the design row first (createSessionFromDesign), so a
 * session can never run parameters its design no longer shows.
 */
export async function updateDesign(courseId: number, designId: number, name: string, params: Design) {
  const [res] = await db()
    .update(designs)
    .set({ name, params, updatedAt: new Date() })
    .where(
      and(
        eq(designs.courseId, courseId),
        eq(designs.id, designId),
        isNull(designs.archivedAt),
        sql`not exists (select 1 from ${sessions} where ${sessions.designId} = ${designId})`,
      ),
    );
  return res.affectedRows > 0;
}

/**
 * A new, editable version of a design: the same name and parameters, linked to the one it came
 * from, numbered one above the highest version in its line (so two "new version" clicks on v1 make
 * v2 and v3, never two v2s). The old design stays as it was for the sessions that used it.
 */
export async function newDesignVersion(courseId: number, designId: number, userId: number): Promise<number | null> {
  const all = await db()
    .select({ id: designs.id, previousId: designs.previousId, version: designs.version })
    .from(designs)
    .where(eq(designs.courseId, courseId));
  const byId = new Map(all.map((d) => [d.id, d]));
  const rootOf = (id: number) => {
    let d = byId.get(id)!;
    for (let guard = 0; d.previousId !== null && byId.has(d.previousId) && guard < all.length; guard++) d = byId.get(d.previousId)!;
    return d.id;
  };
  if (!byId.has(designId)) return null;
  const root = rootOf(designId);
  const top = Math.max(...all.filter((d) => rootOf(d.id) === root).map((d) => d.version));
  const d = await getDesign(courseId, designId);
  if (!d) return null;
  const [res] = await db()
    .insert(designs)
    .values({ courseId, name: d.name, params: d.params, createdBy: userId, previousId: designId, version: top + 1 });
  return res.insertId;
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
