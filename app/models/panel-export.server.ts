/**
 * The choice panel: stored session rows → one row per participant × supergame × round
 * (product.md, "Data"; columns and meanings in app/lib/panel-codebook.ts). The one place that
 * turns `choices` (+ the partner's row, the frozen design, the draws, the pseudonyms) into panel
 * rows; the CSV/JSON/zip downloads, the API, the credit sheet and the results e-mails all read
 * through it.
 *
 * Memory stays flat whatever the size: rows are read in keyset pages (participant by participant,
 * ordered by supergame and round) and written into the Response body as the client reads, so a
 * 100k-row panel never sits in memory (`npm run bench:export` measures it).
 */
import { and, asc, eq, gt, inArray, or, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { Zip, ZipDeflate } from 'fflate';
import { csvLines } from '#app/lib/csv';
import type { Action } from '#app/lib/automata';
import { type CreditRule, designSchema } from '#app/lib/design';
import { codebookCsv, panelCsvColumns, panelReadme } from '#app/lib/panel-codebook';
import { stagePayoff } from '#app/lib/stage-game';
import { db } from '#app/utils/db.server';
import { memberName } from '#app/models/course.server';
import { choices, courseMembers, sessionParticipants, sessions, supergameDraws, users } from '#drizzle/schema';

export interface PanelRow {
  session: number;
  treatment: string;
  R: number;
  S: number;
  T: number;
  P: number;
  delta: number;
  pseudonym: string;
  partner: string;
  supergame: number;
  round: number;
  action: Action;
  partner_action: Action;
  payoff: number;
  source: 'player' | 'timeout' | 'computer';
  decision_ms: number;
  /** null only if the session's draws were never stored (not for sessions the engine ran) */
  draw: number | null;
  supergame_length: number | null;
  timestamp: string;
}

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
  status: (typeof sessions.$inferSelect)['status'];
  simulated: boolean;
  payoffs: { R: number; S: number; T: number; P: number };
  delta: number;
  /** the frozen design's credit rule (the credit sheet, the results e-mail) */
  credit: CreditRule;
  completedAt: Date | null;
}

/** One session of a course, or a 404 (an id of another course is as unknown as a wrong one). */
export async function requirePanelSession(courseId: number, rawId: string | undefined): Promise<PanelSession> {
  const id = Number(rawId);
  const [s] = Number.isSafeInteger(id) && id > 0 ? await panelSessions(courseId, [id]) : [];
  if (!s) throw new Response('No such session in this course.', { status: 404 });
  return s;
}

/** Sessions of a course by id (ascending); ids of other courses are simply not returned. */
export async function panelSessions(courseId: number, ids?: readonly number[]): Promise<PanelSession[]> {
  if (ids && ids.length === 0) return [];
  const rows = await db()
    .select({
      id: sessions.id,
      courseId: sessions.courseId,
      treatment: sessions.treatment,
      status: sessions.status,
      simulated: sessions.simulated,
      params: sessions.params,
      completedAt: sessions.completedAt,
    })
    .from(sessions)
    .where(and(eq(sessions.courseId, courseId), ids ? inArray(sessions.id, [...ids]) : undefined))
    .orderBy(asc(sessions.id));
  return rows.map((s) => {
    const design = designSchema.parse(s.params);
    return {
      id: s.id,
      courseId: s.courseId,
      treatment: s.treatment,
      status: s.status,
      simulated: s.simulated === 1,
      payoffs: design.payoffs,
      delta: design.delta,
      credit: design.credit,
      completedAt: s.completedAt,
    };
  });
}

export interface PanelOptions {
  /** add name, e-mail, student id and consent; keep participants who declined research consent */
  identified?: boolean;
  /** only these participants (engine keys), e.g. one person's summary */
  participantKeys?: readonly string[];
  /** rows per database page */
  pageSize?: number;
  /** resume after this row (API pagination) */
  after?: PanelCursor | null;
}

/** Position of a row in the panel's order: session id, participant join order, supergame, round. */
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

/** The participants of a session in join order, with who they are (for identified uses). */
export async function panelParticipants(session: PanelSession): Promise<Participant[]> {
  return db()
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
}

async function drawsOf(sessionId: number) {
  const rows = await db()
    .select({ supergame: supergameDraws.supergame, draws: supergameDraws.draws, length: supergameDraws.length })
    .from(supergameDraws)
    .where(eq(supergameDraws.sessionId, sessionId));
  return new Map(rows.map((r) => [r.supergame, r]));
}

const partnerRow = alias(choices, 'partner_choice');

/** One participant's rounds after (supergame, round), with the partner's choice of the same round. */
async function choicePage(sessionId: number, key: string, after: { supergame: number; round: number }, limit: number) {
  return db()
    .select({
      supergame: choices.supergame,
      round: choices.round,
      action: choices.action,
      source: choices.source,
      decisionMs: choices.decisionMs,
      atMs: choices.atMs,
      partnerAction: partnerRow.action,
      partnerKey: partnerRow.participantKey,
      partnerSource: partnerRow.source,
      partnerStrategy: partnerRow.strategy,
    })
    // One participant's rows through (session, participant); left alone, MariaDB may walk the whole
    // session along (session, supergame, round, …) to skip the sort, once per participant.
    .from(choices, { forceIndex: 'choices_participant' })
    // A round enters the panel once both seats have chosen (a round cut by "end now" does not).
    .innerJoin(
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
        eq(choices.participantKey, key),
        or(gt(choices.supergame, after.supergame), and(eq(choices.supergame, after.supergame), gt(choices.round, after.round))),
      ),
    )
    .orderBy(asc(choices.supergame), asc(choices.round))
    .limit(limit);
}

type ChoiceJoin = Awaited<ReturnType<typeof choicePage>>[number];

/** The pure step: one stored choice (with its partner's) → one panel row. */
export function toPanelRow(
  session: PanelSession,
  me: Pick<Participant, 'pseudonym'>,
  c: ChoiceJoin,
  pseudonymOf: ReadonlyMap<string, string>,
  draws: ReadonlyMap<number, { draws: number[]; length: number }>,
): PanelRow {
  const d = draws.get(c.supergame);
  // What the participant faced: a computer whenever one chose for the partner's seat.
  const partner =
    c.partnerKey === null || c.partnerSource === 'computer'
      ? `computer:${c.partnerStrategy ?? 'unknown'}`
      : (pseudonymOf.get(c.partnerKey) ?? c.partnerKey);
  return {
    session: session.id,
    treatment: session.treatment,
    R: session.payoffs.R,
    S: session.payoffs.S,
    T: session.payoffs.T,
    P: session.payoffs.P,
    delta: session.delta,
    pseudonym: me.pseudonym,
    partner,
    supergame: c.supergame,
    round: c.round,
    action: c.action,
    partner_action: c.partnerAction,
    payoff: stagePayoff(session.payoffs, c.action, c.partnerAction),
    source: c.source,
    decision_ms: c.decisionMs,
    draw: d?.draws[c.round - 1] ?? null,
    supergame_length: d?.length ?? null,
    timestamp: new Date(c.atMs).toISOString(),
  };
}

const CONSENT_WORDS = { 1: 'yes', 0: 'no' } as const;

export interface PanelPage<Row> {
  rows: Row[];
  /** where the last row of this page stands */
  last: PanelCursor | null;
}

/**
 * The panel of some sessions, page by page, in a stable order (session, join order, supergame,
 * round). De-identified unless asked: pseudonyms only, and participants who declined research
 * consent (consent = 0) are left out.
 */
export async function* panelPages(list: readonly PanelSession[], opts: PanelOptions = {}): AsyncGenerator<PanelPage<PanelRow | IdentifiedPanelRow>> {
  const pageSize = opts.pageSize ?? 2000;
  const after = opts.after ?? null;
  for (const session of list) {
    if (after && session.id < after.session) continue;
    const people = await panelParticipants(session);
    const pseudonymOf = new Map(people.map((p) => [p.key, p.pseudonym]));
    const draws = await drawsOf(session.id);
    for (const p of people) {
      if (!opts.identified && p.consent === 0) continue;
      if (opts.participantKeys && !opts.participantKeys.includes(p.key)) continue;
      let from = { supergame: 0, round: 0 };
      if (after && session.id === after.session) {
        if (p.seq < after.seq) continue;
        if (p.seq === after.seq) from = { supergame: after.supergame, round: after.round };
      }
      for (;;) {
        const batch = await choicePage(session.id, p.key, from, pageSize);
        if (batch.length === 0) break;
        const rows = batch.map((c) => {
          const row = toPanelRow(session, p, c, pseudonymOf, draws);
          if (!opts.identified) return row;
          return { ...row, name: p.name ?? '', email: p.email, student_id: p.studentId ?? '', consent: p.consent === null ? 'not asked' : CONSENT_WORDS[p.consent as 0 | 1] } satisfies IdentifiedPanelRow;
        });
        const lastChoice = batch[batch.length - 1];
        from = { supergame: lastChoice.supergame, round: lastChoice.round };
        yield { rows, last: { session: session.id, seq: p.seq, ...from } };
        if (batch.length < pageSize) break;
      }
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
  for await (const page of panelPages(list, opts)) yield csvLines(page.rows as unknown as Record<string, unknown>[], columns, { header: false });
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
      panelReadme({ course, sessions: list.map((s) => ({ id: s.id, treatment: s.treatment, simulated: s.simulated })), identified, files, createdAt: mtime }),
    );
    zip.end();
    yield* drain();
  }
  return bodyFrom(pieces());
}
