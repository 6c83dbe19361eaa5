// Choice panels uploaded from elsewhere (another session, another lab, a published data set),
// stored for estimation in the shape of app/lib/panel.ts's ChoiceRow.
import { and, desc, eq } from 'drizzle-orm';
import type { ChoiceRow } from '#app/lib/panel';
import { db } from '#app/utils/db.server';
import { datasets, users } from '#drizzle/schema';

export const DATASET_LIMITS = {
  /** bytes of the uploaded file */
  maxBytes: 10 * 1024 * 1024,
  /** choices (rows) in one dataset */
  maxRows: 100_000,
} as const;

export async function listDatasets(courseId: number) {
  return db()
    .select({ id: datasets.id, name: datasets.name, rowCount: datasets.rowCount, createdAt: datasets.createdAt, by: users.email })
    .from(datasets)
    .innerJoin(users, eq(users.id, datasets.createdBy))
    .where(eq(datasets.courseId, courseId))
    .orderBy(desc(datasets.id));
}

export async function createDataset(courseId: number, userId: number, name: string, rows: readonly ChoiceRow[]) {
  const stored = rows.map(({ line: _line, ...r }) => r);
  const [res] = await db().insert(datasets).values({ courseId, name, rows: stored, rowCount: stored.length, createdBy: userId });
  return res.insertId;
}

export async function deleteDataset(courseId: number, id: number) {
  const [res] = await db().delete(datasets).where(and(eq(datasets.courseId, courseId), eq(datasets.id, id)));
  return res.affectedRows > 0;
}
