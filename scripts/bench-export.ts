/**
 * Benchmark of the choice-panel export (run by scripts/bench-export.mjs, which provides the
 * database): a synthetic session of 100 participants × 40 supergames × 25 rounds = 100,000 panel
 * rows is inserted, streamed as CSV and as a zip exactly as the download route streams them, and
 * removed. Reports rows, bytes, time and peak memory (rss and heap sampled every 10 ms, against
 * the level before the export). Targets: CSV in < 10 s, and the export's own memory (peak rss
 * above the level before it) < 64 MB — flat, since rows are read in pages and written as read.
 */
import { eq } from 'drizzle-orm';
import { panelCsvStream, panelSessions, panelZipStream } from '#app/models/panel-export.server';
import { closeDb, db } from '#app/utils/db.server';
import { courses, users } from '#drizzle/schema';
import { insertSyntheticSession } from '#tests/helpers/synthetic-session';

const MB = 1024 * 1024;
const gc = (globalThis as { gc?: () => void }).gc ?? (() => undefined);

async function measure(label: string, body: ReadableStream<Uint8Array>, countLines: boolean) {
  gc();
  await new Promise((r) => setTimeout(r, 50));
  const before = process.memoryUsage();
  let peakRss = before.rss;
  let peakHeap = before.heapUsed;
  const sample = () => {
    const m = process.memoryUsage();
    peakRss = Math.max(peakRss, m.rss);
    peakHeap = Math.max(peakHeap, m.heapUsed);
  };
  const timer = setInterval(sample, 10);
  const t0 = performance.now();
  let bytes = 0;
  let lines = 0;
  const reader = body.getReader();
  for (;;) {
    const { value, done } = await reader.read();
    if (done) break;
    bytes += value.byteLength;
    if (countLines) for (const b of value) if (b === 10) lines++;
    sample();
  }
  const ms = performance.now() - t0;
  clearInterval(timer);
  const rows = countLines ? `${(lines - 1).toLocaleString('en-GB')} rows, ` : '';
  const rate = countLines ? ` (${Math.round((lines / ms) * 1000).toLocaleString('en-GB')} rows/s)` : '';
  console.log(
    `${label}: ${rows}${(bytes / MB).toFixed(1)} MB in ${(ms / 1000).toFixed(2)} s${rate}; ` +
      `rss ${(before.rss / MB).toFixed(0)} → peak ${(peakRss / MB).toFixed(0)} MB (+${((peakRss - before.rss) / MB).toFixed(1)} MB), ` +
      `heap ${(before.heapUsed / MB).toFixed(0)} → peak ${(peakHeap / MB).toFixed(0)} MB`,
  );
  return { ms, rows: lines - 1, extraRss: peakRss - before.rss };
}

const [u] = await db()
  .insert(users)
  .values({ email: `bench-${process.pid}@bench.parley.test`, name: 'Bench (synthetic)' });
const [c] = await db().insert(courses).values({ title: 'Export benchmark (synthetic)', isDemo: true, createdBy: u.insertId });
let removeSession: (() => Promise<void>) | null = null;
try {
  const t0 = performance.now();
  const s = await insertSyntheticSession(db(), {
    courseId: c.insertId,
    createdBy: u.insertId,
    participants: 100,
    lengths: Array.from({ length: 40 }, () => 25),
    tag: `bench-${process.pid}`,
    seed: 99,
  });
  removeSession = s.remove;
  console.log(`inserted a synthetic session of 100 × 40 × 25 = 100,000 panel rows in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
  const list = await panelSessions(c.insertId, [s.sessionId]);

  const csv = await measure('CSV ', panelCsvStream(list), true);
  await measure('zip ', panelZipStream('Export benchmark', list), false);
  const ok = csv.rows === 100_000 && csv.ms < 10_000 && csv.extraRss < 64 * MB;
  console.log(
    `targets: 100,000 rows ${csv.rows === 100_000 ? '✓' : '✗'} · CSV < 10 s ${csv.ms < 10_000 ? '✓' : '✗'} · export's own memory < 64 MB ${csv.extraRss < 64 * MB ? '✓' : '✗'}`,
  );
  if (!ok) process.exitCode = 1;
} finally {
  await removeSession?.();
  await db().delete(courses).where(eq(courses.id, c.insertId));
  await db().delete(users).where(eq(users.id, u.insertId));
  await closeDb();
}
