// Choice panels uploaded from elsewhere (another session, another lab, a published data set),
// stored for estimation in the shape of app/lib/panel.ts's ChoiceRow: a `datasets` row and one
// `dataset_rows` row per choice, in the file's order.
import { and, asc, desc, eq } from 'drizzle-orm';
import type { ChoiceRow } from '#app/lib/panel';
import { db } from '#app/utils/db.server';
import { datasetRows, datasets, users } from '#drizzle/schema';

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

/**
 * One INSERT carries at most this many rows, or about this many bytes of labels: each statement
 * stays far below MariaDB's max_allowed_packet (16 MB by default) whatever the labels' length.
 */
const BATCH_ROWS = 2000;
const BATCH_BYTES = 1024 * 1024;

/** Stores a validated panel: all of it or nothing (one transaction), however many batches. */
export async function createDataset(courseId: number, userId: number, name: string, rows: readonly ChoiceRow[]) {
  return db().transaction(async (tx) => {
    const [res] = await tx.insert(datasets).values({ courseId, name, rowCount: rows.length, createdBy: userId });
    const datasetId = res.insertId;
    let batch: (typeof datasetRows.$inferInsert)[] = [];
    let bytes = 0;
    for (const [seq, r] of rows.entries()) {
      batch.push({
        datasetId,
        seq,
        session: r.session,
        treatment: r.treatment,
        subject: r.subject,
        partner: r.partner,
        supergame: r.supergame,
        round: r.round,
        action: r.action,
        partnerAction: r.partnerAction,
      });
      // UTF-16 length × 3 bounds the UTF-8 bytes (escaping in the statement aside)
      bytes += 3 * (r.session.length + r.treatment.length + r.subject.length + r.partner.length) + 64;
      if (batch.length >= BATCH_ROWS || bytes >= BATCH_BYTES) {
        await tx.insert(datasetRows).values(batch);
        batch = [];
        bytes = 0;
      }
    }
    if (batch.length) await tx.insert(datasetRows).values(batch);
    return datasetId;
  });
}

/** A dataset's rows in the file's order, or null when it is not a dataset of this course. */
export async function datasetChoiceRows(courseId: number, datasetId: number): Promise<ChoiceRow[] | null> {
  const [d] = await db()
    .select({ id: datasets.id })
    .from(datasets)
    .where(and(eq(datasets.courseId, courseId), eq(datasets.id, datasetId)));
  if (!d) return null;
  return db()
    .select({
      session: datasetRows.session,
      treatment: datasetRows.treatment,
      subject: datasetRows.subject,
      partner: datasetRows.partner,
      supergame: datasetRows.supergame,
      round: datasetRows.round,
      action: datasetRows.action,
      partnerAction: datasetRows.partnerAction,
    })
    .from(datasetRows)
    .where(eq(datasetRows.datasetId, d.id))
    .orderBy(asc(datasetRows.seq));
}

export async function deleteDataset(courseId: number, id: number) {
  const [res] = await db()
    .delete(datasets)
    .where(and(eq(datasets.courseId, courseId), eq(datasets.id, id)));
  return res.affectedRows > 0;
}
