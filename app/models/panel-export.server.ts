/**
 * The choice panel reader: the one way stored session rows leave the database as choice-panel
 * rows (product.md, "Data"; docs/decisions/021 and 026). The Debrief, a participant's own
 * summary, estimations on sessions, the CSV/JSON/zip downloads, the API, the credit sheet and the
 * results e-mails all read through `panelPages`; each row is made by the pure rule in
 * app/lib/choice-panel.ts.
 *
 * Memory stays flat whatever the size: rows are read in keyset pages (participant by participant,
 * ordered by supergame and round) and written into the Response body as the client reads, so a
 * 100k-row panel never sits in memory (`npm run bench:export` measures it).
 */
import { and, asc, eq, gt, inArray, or, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { Zip, ZipDeflate } from 'fflate';
import { csvLines } from '#app/lib/csv';
import { comparePseudonyms, type PanelContext, type PanelRow, panelRowOf, seatKey, type UnfinishedRound } from '#app/lib/choice-panel';
import type { CreditRule } from '#app/lib/design';
import { codebookCsv, panelCsvColumns, panelReadme } from '#app/lib/panel-codebook';
import { db } from '#app/utils/db.server';
import { memberName } from '#app/models/course.server';
import { type Session, sessionColumns, toSession } from '#app/models/session-row.server';
import { choices, courseMembers, sessionParticipants, sessions, supergameDraws, users } from '#drizzle/schema';

export type { PanelRow } from '#app/lib/choice-panel';

/** The identified export's extra columns (instructors only, logged). */
export interface IdentifiedPanelRow extends PanelRow {
  name: string;
  email: string;
  student_id: string;
  consent: 'yes' | 'no' | 'not asked';
}

export interface PanelSession {
  id: number;
  courseId: number;
  treatment: string;
  status: Session['status'];
  simulated: boolean;
  payoffs: { R: number; S: number; T: number; P: number };
  delta: number;
  /** the frozen design's credit rule (the credit sheet, the results e-mail) */
  credit: CreditRule;
  completedAt: Date | null;
}

/** One session of a course, or null (an id of another course is as unknown as a wrong one). */
export async function findPanelSession(courseId: number, id: number): Promise<PanelSession | null> {
  const [s] = await panelSessions(courseId, [id]);
  return s ?? null;
}

/** A session (with its frozen design) as the reader's session. */
export function panelSessionOf(s: Session): PanelSession {
  const { design } = s;
  return {
    id: s.id,
    courseId: s.courseId,
    treatment: s.treatment,
    status: s.status,
    simulated: s.simulated,
    payoffs: design.payoffs,
    delta: design.delta,
    credit: design.credit,
    completedAt: s.completedAt,
  };
}

/** Sessions of a course by id (ascending); ids of other courses are simply not returned. */
export async function panelSessions(courseId: number, ids?: readonly number[]): Promise<PanelSession[]> {
  if (ids && ids.length === 0) return [];
  const rows = await db()
    .select(sessionColumns)
    .from(sessions)
    .where(and(eq(sessions.courseId, courseId), ids ? inArray(sessions.id, [...ids]) : undefined))
    .orderBy(asc(sessions.id));
  return rows.map((r) => panelSessionOf(toSession(r)));
}

export interface PanelOptions {
  /** add name, e-mail, student id and consent; keep participants who declined research consent */
  identified?: boolean;
  /**
   * keep participants who declined research consent in a de-identified panel: only for what the
   * class itself sees (the Debrief on screen, a participant's own summary), never for data that
   * leaves Parley or is stored for research (docs/decisions/026)
   */
  keepDeclined?: boolean;
  /** only these participants (engine keys), e.g. one person's summary */
  participantKeys?: readonly string[];
  /** rows per database page */
  pageSize?: number;
  /** resume after this row (API pagination) */
  after?: PanelCursor | null;
}

/** Position of a row in the panel's order: session id, participant (join order), supergame, round. */
export interface PanelCursor {
  session: number;
  seq: number;
  supergame: number;
  round: number;
}

export interface Participant {
  key: string;
  seq: number;
  pseudonym: string;
  consent: number | null;
  name: string | null;
  email: string;
  studentId: string | null;
}

/** The participants of a session in numeric pseudonym order, with who they are (for identified uses). */
export async function panelParticipants(session: PanelSession): Promise<Participant[]> {
  const people = await db()
    .select({
      key: sessionParticipants.participantKey,
      seq: sessionParticipants.seq,
      pseudonym: sessionParticipants.pseudonym,
      consent: sessionParticipants.consent,
      name: memberName,
      email: users.email,
      studentId: courseMembers.studentId,
    })
    .from(sessionParticipants)
    .innerJoin(users, eq(users.id, sessionParticipants.userId))
    .leftJoin(courseMembers, and(eq(courseMembers.userId, sessionParticipants.userId), eq(courseMembers.courseId, session.courseId)))
    .where(eq(sessionParticipants.sessionId, session.id))
    .orderBy(asc(sessionParticipants.seq));
  // P-999 before P-1000 (a text sort puts "P-1000" before "P-101")
  return people.sort((a, b) => comparePseudonyms(a.pseudonym, b.pseudonym) || a.seq - b.seq);
}

/** The session-wide facts the row rule needs: draws, and the seats a computer chose in. */
async function contextOf(session: PanelSession, people: readonly Participant[]): Promise<PanelContext> {
  const [draws, computer] = await Promise.all([
    db()
      .select({ supergame: supergameDraws.supergame, draws: supergameDraws.draws, length: supergameDraws.length })
      .from(supergameDraws)
      .where(eq(supergameDraws.sessionId, session.id)),
    db()
      .selectDistinct({ supergame: choices.supergame, pairId: choices.pairId, seat: choices.seat })
      .from(choices)
      .where(and(eq(choices.sessionId, session.id), eq(choices.source, 'computer'))),
  ]);
  return {
    session: { id: session.id, treatment: session.treatment, payoffs: session.payoffs, delta: session.delta },
    pseudonyms: new Map(people.map((p) => [p.key, p.pseudonym])),
    draws: new Map(draws.map((d) => [d.supergame, d])),
    computerSeats: new Set(computer.map((c) => seatKey(c.supergame, c.pairId, c.seat))),
  };
}

const partnerRow = alias(choices, 'partner_choice');

const choiceColumns = {
  participantKey: choices.participantKey,
  supergame: choices.supergame,
  round: choices.round,
  pairId: choices.pairId,
  seat: choices.seat,
  action: choices.action,
  source: choices.source,
  strategy: choices.strategy,
  decisionMs: choices.decisionMs,
  atMs: choices.atMs,
  partnerKey: partnerRow.participantKey,
  partnerAction: partnerRow.action,
  partnerSource: partnerRow.source,
  partnerStrategy: partnerRow.strategy,
};

/** Each of some participants' choices with the partner seat's choice of the same round (or nulls). */
function choicesWithPartner(sessionId: number, keys: readonly string[], after?: { supergame: number; round: number }) {
  return (
    db()
      .select(choiceColumns)
      // Participants' rows through (session, participant); left alone, MariaDB may walk the whole
      // session along (session, supergame, round, …) to skip the sort, once per participant.
      .from(choices, { forceIndex: 'choices_participant' })
      // LEFT: a round the partner has not chosen in yet is read too, and counted as half-finished.
      .leftJoin(
        partnerRow,
        and(
          eq(partnerRow.sessionId, choices.sessionId),
          eq(partnerRow.supergame, choices.supergame),
          eq(partnerRow.round, choices.round),
          eq(partnerRow.pairId, choices.pairId),
          sql`${partnerRow.seat} = 1 - ${choices.seat}`,
        ),
      )
      .where(
        and(
          eq(choices.sessionId, sessionId),
          keys.length === 1 ? eq(choices.participantKey, keys[0]) : inArray(choices.participantKey, [...keys]),
          after
            ? or(gt(choices.supergame, after.supergame), and(eq(choices.supergame, after.supergame), gt(choices.round, after.round)))
            : undefined,
        ),
      )
  );
}

/** One participant's rounds after (supergame, round), in order, at most `limit`. */
function choicePage(sessionId: number, key: string, after: { supergame: number; round: number }, limit: number) {
  return choicesWithPartner(sessionId, [key], after).orderBy(asc(choices.supergame), asc(choices.round)).limit(limit);
}

type ChoiceJoin = Awaited<ReturnType<typeof choicePage>>[number];

/** Rows per participant of a session (one grouped pass over the participant index). */
async function rowCounts(sessionId: number): Promise<Map<string, number>> {
  const rows = await db()
    .select({ key: choices.participantKey, n: sql<number>`COUNT(*)` })
    .from(choices, { forceIndex: 'choices_participant' })
    .where(eq(choices.sessionId, sessionId))
    .groupBy(choices.participantKey);
  return new Map(rows.filter((r) => r.key !== null).map((r) => [r.key!, Number(r.n)]));
}

const CONSENT_WORDS = { 1: 'yes', 0: 'no' } as const;

export interface PanelPage<Row> {
  rows: Row[];
  /** rounds of this page that only one seat chose in: not rows, counted */
  unfinished: UnfinishedRound[];
  /** where the last row of this page stands */
  last: PanelCursor | null;
}

/**
 * The panel of some sessions, page by page, in a stable order (session, numeric pseudonym,
 * supergame, round). De-identified unless asked: pseudonyms only, and participants who declined
 * research consent (consent = 0) are left out unless `identified` or `keepDeclined`.
 */
export async function* panelPages(
  list: readonly PanelSession[],
  opts: PanelOptions = {},
): AsyncGenerator<PanelPage<PanelRow | IdentifiedPanelRow>> {
  const pageSize = opts.pageSize ?? 2000;
  const after = opts.after ?? null;
  for (const session of list) {
    if (after && session.id < after.session) continue;
    const people = await panelParticipants(session);
    const [ctx, counts] = await Promise.all([contextOf(session, people), rowCounts(session.id)]);
    // resuming: skip the participants before the cursor's (in the panel's order, not by seq)
    let startAt = 0;
    if (after && session.id === after.session)
      startAt = Math.max(
        0,
        people.findIndex((p) => p.seq === after.seq),
      );
    const wanted = people.filter(
      (p, i) =>
        i >= startAt &&
        (opts.identified || opts.keepDeclined || p.consent !== 0) &&
        (!opts.participantKeys || opts.participantKeys.includes(p.key)) &&
        (counts.get(p.key) ?? 0) > 0,
    );

    const toPage = (p: Participant, batch: readonly ChoiceJoin[]): PanelPage<PanelRow | IdentifiedPanelRow> => {
      const rows: (PanelRow | IdentifiedPanelRow)[] = [];
      const unfinished: UnfinishedRound[] = [];
      for (const c of batch) {
        const partner =
          c.partnerAction === null
            ? null
            : { participantKey: c.partnerKey, action: c.partnerAction, source: c.partnerSource!, strategy: c.partnerStrategy };
        const row = panelRowOf(ctx, p.pseudonym, c, partner);
        if (!row) unfinished.push({ pseudonym: p.pseudonym, supergame: c.supergame, round: c.round });
        else if (!opts.identified) rows.push(row);
        else
          rows.push({
            ...row,
            name: p.name ?? '',
            email: p.email,
            student_id: p.studentId ?? '',
            consent: p.consent === null ? 'not asked' : CONSENT_WORDS[p.consent as 0 | 1],
          });
      }
      const lastChoice = batch[batch.length - 1];
      return { rows, unfinished, last: { session: session.id, seq: p.seq, supergame: lastChoice.supergame, round: lastChoice.round } };
    };

    for (let i = 0; i < wanted.length;) {
      const p = wanted[i];
      const resume = after && session.id === after.session && p.seq === after.seq;
      if (!resume && (counts.get(p.key) ?? 0) < pageSize) {
        // Participants with few rows are read several at once, up to a page of rows: one query
        // instead of one per participant (a class of hundreds has a handful of rows each).
        const group: Participant[] = [];
        let n = 0;
        while (i < wanted.length && group.length < 500 && n + (counts.get(wanted[i].key) ?? 0) <= pageSize) {
          const q = wanted[i];
          if (after && session.id === after.session && q.seq === after.seq) break;
          group.push(q);
          n += counts.get(q.key) ?? 0;
          i++;
        }
        if (group.length > 0) {
          const batch = await choicesWithPartner(
            session.id,
            group.map((q) => q.key),
          );
          const byKey = new Map<string, ChoiceJoin[]>();
          for (const c of batch) byKey.set(c.participantKey!, [...(byKey.get(c.participantKey!) ?? []), c]);
          for (const q of group) {
            const mine = (byKey.get(q.key) ?? []).sort((x, y) => x.supergame - y.supergame || x.round - y.round);
            if (mine.length > 0) yield toPage(q, mine);
          }
          continue;
        }
      }
      // A participant with many rows (or the one a cursor stopped in): keyset pages of their own.
      let from = resume ? { supergame: after.supergame, round: after.round } : { supergame: 0, round: 0 };
      for (;;) {
        const batch = await choicePage(session.id, p.key, from, pageSize);
        if (batch.length === 0) break;
        const page = toPage(p, batch);
        from = { supergame: page.last!.supergame, round: page.last!.round };
        yield page;
        if (batch.length < pageSize) break;
      }
      i++;
    }
  }
}

/** One page of at most `limit` rows and the cursor of the next page (null at the end). */
export async function panelPage(list: readonly PanelSession[], limit: number, after: PanelCursor | null) {
  const rows: (PanelRow | IdentifiedPanelRow)[] = [];
  let next: PanelCursor | null = null;
  // Ask for one row more than needed, so the last page says it is the last.
  const pages = panelPages(list, { after, pageSize: Math.min(limit + 1, 2000) });
  for await (const page of pages) {
    for (let i = 0; i < page.rows.length; i++) {
      if (rows.length === limit) {
        await pages.return(undefined);
        return { rows, next };
      }
      rows.push(page.rows[i]);
      // the cursor of row i: the page's last position moved back to row i's own round
      next = { ...page.last!, supergame: page.rows[i].supergame, round: page.rows[i].round };
    }
  }
  return { rows, next: null };
}

export const encodeCursor = (c: PanelCursor) => Buffer.from(JSON.stringify([c.session, c.seq, c.supergame, c.round])).toString('base64url');

export function decodeCursor(raw: string): PanelCursor | null {
  try {
    const v = JSON.parse(Buffer.from(raw, 'base64url').toString('utf8')) as unknown;
    if (!Array.isArray(v) || v.length !== 4 || !v.every((x) => Number.isSafeInteger(x) && x >= 0)) return null;
    const [session, seq, supergame, round] = v as number[];
    return { session, seq, supergame, round };
  } catch {
    return null;
  }
}

// ---------------------------------------------------------------------------------------------
// Streams for the Response body: CSV, JSON and a zip of several files.

const encoder = new TextEncoder();

/** A pull-based body: the next piece is produced only when the client has read the previous one. */
function bodyFrom(pieces: AsyncGenerator<string | Uint8Array>): ReadableStream<Uint8Array> {
  return new ReadableStream<Uint8Array>(
    {
      async pull(controller) {
        try {
          const { value, done } = await pieces.next();
          if (done) controller.close();
          else controller.enqueue(typeof value === 'string' ? encoder.encode(value) : value);
        } catch (error) {
          controller.error(error);
        }
      },
      async cancel() {
        await pieces.return(undefined);
      },
    },
    { highWaterMark: 1 },
  );
}

/** CSV in pieces: a header, then one piece per database page. R- and pandas-friendly (codebook). */
export async function* panelCsvPieces(list: readonly PanelSession[], opts: PanelOptions = {}): AsyncGenerator<string> {
  const columns = panelCsvColumns(Boolean(opts.identified));
  yield csvLines([], columns);
  // Each page through the one CSV writer: treatments and names come from people and are
  // neutralised as text; the codebook's number columns stay numbers (negative payoffs too).
  for await (const page of panelPages(list, opts)) yield csvLines(page.rows, columns, { header: false });
}

async function* panelJsonPieces(list: readonly PanelSession[], opts: PanelOptions): AsyncGenerator<string> {
  yield '[';
  let first = true;
  for await (const page of panelPages(list, opts)) {
    const body = page.rows.map((r) => JSON.stringify(r)).join(',\n');
    yield (first ? '\n' : ',\n') + body;
    first = false;
  }
  yield '\n]\n';
}

export function panelCsvStream(list: readonly PanelSession[], opts: PanelOptions = {}) {
  return bodyFrom(panelCsvPieces(list, opts));
}

export function panelJsonStream(list: readonly PanelSession[], opts: PanelOptions = {}) {
  return bodyFrom(panelJsonPieces(list, opts));
}

/**
 * A zip of panel.csv, codebook.csv and README.md (the codebook embedded), compressed as it is
 * read: fflate's streaming Zip takes the CSV page by page and hands back compressed bytes.
 */
export function panelZipStream(course: string, list: readonly PanelSession[], opts: PanelOptions = {}) {
  const identified = Boolean(opts.identified);
  const files = ['panel.csv', 'codebook.csv', 'README.md'];
  async function* pieces(): AsyncGenerator<Uint8Array> {
    const out: Uint8Array[] = [];
    let failure: Error | null = null;
    const zip = new Zip((error, chunk) => {
      if (error) failure = error;
      else out.push(chunk);
    });
    const drain = function* () {
      if (failure) throw failure;
      while (out.length) yield out.shift()!;
    };
    const mtime = new Date();
    const add = async function* (name: string, source: AsyncIterable<string> | string) {
      const file = new ZipDeflate(name, { level: 6 });
      file.mtime = mtime;
      zip.add(file);
      if (typeof source === 'string') file.push(encoder.encode(source), true);
      else {
        for await (const piece of source) {
          file.push(encoder.encode(piece));
          yield* drain();
        }
        file.push(new Uint8Array(0), true);
      }
      yield* drain();
    };
    yield* add('panel.csv', panelCsvPieces(list, opts));
    yield* add('codebook.csv', codebookCsv(identified));
    yield* add(
      'README.md',
      panelReadme({
        course,
        sessions: list.map((s) => ({ id: s.id, treatment: s.treatment, simulated: s.simulated })),
        identified,
        files,
        createdAt: mtime,
      }),
    );
    zip.end();
    yield* drain();
  }
  return bodyFrom(pieces());
}
