// Strategy leagues of a course (issue 15; docs/decisions/033): storage, the participants' entries,
// and the run job that computes the round-robin, the standings, the simulated version and the
// evolution (app/lib/league.ts) and stores them as the league's results.
//
// Exported names (the participant side codes against these):
//   types   League, LeagueEntry, LeagueSummary, ParticipantLeague, ParticipantLeagueSummary,
//           SaveEntryResult, LeagueChange, LeagueStatus
//   staff   listLeagues(courseId), getLeague(courseId, leagueId), leagueCourseId(leagueId) (API scope), createLeague, updateLeague,
//           setLeagueState(courseId, leagueId, from[], to), startLeagueRun, leagueStatus,
//           addHouseEntry, removeEntry, listEntries(leagueId), entryAutomaton(entry),
//           classEstimates(courseId), setComparisonSession
//   phones  leaguesForParticipant(userId), participantLeague(leagueId, userId),
//           saveEntry(leagueId, userId, { name, automaton })
//   job     leagueRunJob (registered in app/jobs/all.server.ts; computes on a worker thread,
//           app/lib/league-worker.server.ts, with app/lib/league-run.ts)
//
// What participants see (a decision): every league of a course they are a participant of, in any
// state, so an entrant knows their entry is in and entries have closed; results only once the
// league is published. Staff pages reach leagues through requireCourseRole first.
import { and, asc, count, desc, eq, gt, inArray, isNull, sql } from 'drizzle-orm';
import { z } from 'zod';
import { defineJob, enqueue, kickJobs } from '#app/jobs/queue.server';
import { type Automaton, libraryStrategy } from '#app/lib/automata';
import type { AutomatonIssue } from '#app/lib/automaton-check';
import { leagueEntryIssues } from '#app/lib/league';
import {
  LEAGUE_ENTRY_NAME_MAX,
  LEAGUE_MAX_ENTRIES,
  type LeagueDesign,
  type LeagueResults,
  type LeagueRunStatus,
  type LeagueState,
  type ResultEntry,
} from '#app/lib/league-design';
import { automatonOfEntry } from '#app/lib/league-run';
import { computeLeagueOnWorker } from '#app/lib/league-worker.server';
import { type StrategyFile, toStrategyFile } from '#app/lib/strategy-file';
import { db } from '#app/utils/db.server';
import { estimateRequestSchema } from '#app/utils/estimate-form';
import { courseMembers, courses, estimates, leagueEntries, leagues, users } from '#drizzle/schema';
import { memberName } from './course.server';
import type { EstimateResult } from './estimate.server';
import { getCourseSessions, listCourseSessions } from './panel.server';

// ---------------------------------------------------------------------------------------------
// Rows

/** The one mapping of a stored league row (design and results validated by their columns). */
export const leagueColumns = {
  id: leagues.id,
  courseId: leagues.courseId,
  title: leagues.title,
  design: leagues.design,
  deadline: leagues.deadline,
  state: leagues.state,
  results: leagues.results,
  runStatus: leagues.runStatus,
  runProgress: leagues.runProgress,
  runTotal: leagues.runTotal,
  runError: leagues.runError,
  createdBy: leagues.createdBy,
  createdAt: leagues.createdAt,
  closedAt: leagues.closedAt,
  runAt: leagues.runAt,
  publishedAt: leagues.publishedAt,
  comparisonSessionId: leagues.comparisonSessionId,
};

type LeagueRecord = Pick<typeof leagues.$inferSelect, keyof typeof leagueColumns>;

export interface League extends LeagueRecord {
  design: LeagueDesign;
  state: LeagueState;
  results: LeagueResults | null;
  runStatus: LeagueRunStatus;
}

export const toLeague = (r: LeagueRecord): League => ({ ...r });

export interface LeagueEntry {
  id: number;
  leagueId: number;
  /** null for a house entry */
  userId: number | null;
  house: boolean;
  name: string;
  /** the parley-strategy v1 file as stored */
  strategy: StrategyFile;
  createdAt: Date;
  updatedAt: Date;
}

const entryColumns = {
  id: leagueEntries.id,
  leagueId: leagueEntries.leagueId,
  userId: leagueEntries.userId,
  house: leagueEntries.house,
  name: leagueEntries.name,
  strategy: leagueEntries.strategy,
  createdAt: leagueEntries.createdAt,
  updatedAt: leagueEntries.updatedAt,
};

/** The automaton of a stored entry (0-based states, app/lib/automata.ts). */
export const entryAutomaton = automatonOfEntry;

/** May entries be added, changed or removed now? (open, and before the deadline) */
export const acceptsEntries = (l: Pick<League, 'state' | 'deadline'>, now = new Date()) =>
  l.state === 'open' && (l.deadline === null || l.deadline.getTime() > now.getTime());

// ---------------------------------------------------------------------------------------------
// Staff

/** A league in a list: everything but its results (they can be megabytes), whether it has them, and its entry counts. */
export interface LeagueSummary extends Omit<League, 'results'> {
  hasResults: boolean;
  entries: number;
  houseEntries: number;
}

/**
 * A course's leagues with their entry counts: all of them newest first (the staff list), or with
 * `page` a page in id order after `afterId` (the API's cursor pages).
 */
export async function listLeagues(courseId: number, page?: { afterId: number; limit: number }): Promise<LeagueSummary[]> {
  const { results: _results, ...columns } = leagueColumns;
  const query = db()
    .select({ ...columns, hasResults: sql<number>`${leagues.results} IS NOT NULL`.mapWith(Number) })
    .from(leagues);
  const rows = page
    ? await query
        .where(and(eq(leagues.courseId, courseId), gt(leagues.id, page.afterId)))
        .orderBy(asc(leagues.id))
        .limit(page.limit)
    : await query.where(eq(leagues.courseId, courseId)).orderBy(desc(leagues.id));
  if (rows.length === 0) return [];
  const counts = await db()
    .select({ leagueId: leagueEntries.leagueId, house: leagueEntries.house, n: count() })
    .from(leagueEntries)
    .where(
      inArray(
        leagueEntries.leagueId,
        rows.map((r) => r.id),
      ),
    )
    .groupBy(leagueEntries.leagueId, leagueEntries.house);
  return rows.map((r) => {
    const mine = counts.filter((c) => c.leagueId === r.id);
    const house = Number(mine.find((c) => c.house)?.n ?? 0);
    return { ...r, hasResults: r.hasResults === 1, entries: mine.reduce((s, c) => s + Number(c.n), 0), houseEntries: house };
  });
}

export async function getLeague(courseId: number, leagueId: number): Promise<League | null> {
  const [r] = await db()
    .select(leagueColumns)
    .from(leagues)
    .where(and(eq(leagues.courseId, courseId), eq(leagues.id, leagueId)));
  return r ? toLeague(r) : null;
}

/** The course a league belongs to (the API checks the token's scope on it before reading the league). */
export async function leagueCourseId(leagueId: number): Promise<number | null> {
  const [r] = await db().select({ courseId: leagues.courseId }).from(leagues).where(eq(leagues.id, leagueId));
  return r?.courseId ?? null;
}

export interface LeagueInput {
  title: string;
  design: LeagueDesign;
  deadline: Date | null;
}

export async function createLeague(courseId: number, userId: number, input: LeagueInput): Promise<League> {
  const [res] = await db()
    .insert(leagues)
    .values({ courseId, createdBy: userId, ...input, state: 'open' });
  return (await getLeague(courseId, res.insertId))!;
}

export type LeagueChange = { ok: true; league: League } | { ok: false; message: string };

/** Title, design and deadline can change until the league has run (results are of one design). */
export async function updateLeague(courseId: number, leagueId: number, input: Partial<LeagueInput>): Promise<LeagueChange | null> {
  const [res] = await db()
    .update(leagues)
    .set(input)
    .where(and(eq(leagues.courseId, courseId), eq(leagues.id, leagueId), inArray(leagues.state, ['open', 'closed'])));
  const league = await getLeague(courseId, leagueId);
  if (!league) return null;
  if (res.affectedRows === 0) return { ok: false, message: 'A league that has run keeps its settings; reopen it for entries first.' };
  return { ok: true, league };
}

/** What else changes when a league enters each state. */
const stateStamp = (to: LeagueState, now: Date): Partial<typeof leagues.$inferInsert> =>
  ({
    open: { closedAt: null, runAt: null, publishedAt: null, results: null, runStatus: 'none', runProgress: 0, runTotal: 0, runError: null },
    closed: { closedAt: now },
    run: { publishedAt: null },
    published: { publishedAt: now },
  })[to] as Partial<typeof leagues.$inferInsert>;

/**
 * Moves a league from one of `from` to `to` with one conditional UPDATE, so two clicks (or two
 * staff members) cannot both move it: the second finds it no longer in `from`. Reopening (`open`)
 * forgets the results, which a new run computes again from the entries as they are then.
 * Null: no such league in the course.
 */
export async function setLeagueState(
  courseId: number,
  leagueId: number,
  from: readonly LeagueState[],
  to: LeagueState,
): Promise<LeagueChange | null> {
  const [res] = await db()
    .update(leagues)
    .set({ state: to, ...stateStamp(to, new Date()) })
    .where(and(eq(leagues.courseId, courseId), eq(leagues.id, leagueId), inArray(leagues.state, [...from])));
  const league = await getLeague(courseId, leagueId);
  if (!league) return null;
  if (res.affectedRows === 0) return { ok: false, message: `The league is ${league.state} now; reload the page to see what changed.` };
  return { ok: true, league };
}

/** A league's entries, house entries after participants', each in the order entered. */
export async function listEntries(leagueId: number): Promise<LeagueEntry[]> {
  return db()
    .select(entryColumns)
    .from(leagueEntries)
    .where(eq(leagueEntries.leagueId, leagueId))
    .orderBy(asc(leagueEntries.house), asc(leagueEntries.id));
}

export type EntryChange = { ok: true; entry: LeagueEntry } | { ok: false; message: string };

/** Locks the league row (inside a transaction) so entry changes and state moves do not interleave. */
async function lockedLeague(tx: Parameters<Parameters<ReturnType<typeof db>['transaction']>[0]>[0], leagueId: number) {
  const [l] = await tx
    .select({ id: leagues.id, courseId: leagues.courseId, state: leagues.state, deadline: leagues.deadline })
    .from(leagues)
    .where(eq(leagues.id, leagueId))
    .for('update');
  return l ?? null;
}

/** A library strategy entered by the instructor, labelled as a house entry. Null: no such league. */
export async function addHouseEntry(courseId: number, leagueId: number, strategyId: string): Promise<EntryChange | null> {
  let automaton: Automaton;
  try {
    automaton = libraryStrategy(strategyId);
  } catch {
    return { ok: false, message: `"${strategyId}" is not a strategy of the library.` };
  }
  const issues = leagueEntryIssues(automaton);
  if (issues.length) return { ok: false, message: issues[0].message };
  return db().transaction(async (tx) => {
    const l = await lockedLeague(tx, leagueId);
    if (!l || l.courseId !== courseId) return null;
    if (l.state !== 'open' && l.state !== 'closed')
      return { ok: false as const, message: 'Entries change only before the league runs; reopen it first.' };
    const [{ n }] = await tx.select({ n: count() }).from(leagueEntries).where(eq(leagueEntries.leagueId, leagueId));
    if (n >= LEAGUE_MAX_ENTRIES) return { ok: false as const, message: `A league has at most ${LEAGUE_MAX_ENTRIES} entries.` };
    const [res] = await tx.insert(leagueEntries).values({
      leagueId,
      userId: null,
      house: true,
      name: automaton.name.slice(0, LEAGUE_ENTRY_NAME_MAX),
      strategy: toStrategyFile(automaton),
    });
    const [entry] = await tx.select(entryColumns).from(leagueEntries).where(eq(leagueEntries.id, res.insertId));
    return { ok: true as const, entry };
  });
}

/** Removes an entry (a house entry or a participant's) before the league runs. Null: not in this course's league. */
export async function removeEntry(
  courseId: number,
  leagueId: number,
  entryId: number,
): Promise<{ ok: true } | { ok: false; message: string } | null> {
  return db().transaction(async (tx) => {
    const l = await lockedLeague(tx, leagueId);
    if (!l || l.courseId !== courseId) return null;
    const [e] = await tx
      .select({ id: leagueEntries.id })
      .from(leagueEntries)
      .where(and(eq(leagueEntries.id, entryId), eq(leagueEntries.leagueId, leagueId)));
    if (!e) return null;
    if (l.state !== 'open' && l.state !== 'closed')
      return { ok: false as const, message: 'Entries change only before the league runs; reopen it first.' };
    await tx.delete(leagueEntries).where(eq(leagueEntries.id, entryId));
    return { ok: true as const };
  });
}

// ---------------------------------------------------------------------------------------------
// The class beside the league: a session's strategy-frequency estimate

export interface ClassEstimate {
  sessionId: number;
  sessionName: string;
  simulated: boolean;
  estimateId: number;
  window: string;
  strategies: string[];
  shares: number[];
  beta: number;
  /** 1 − β, used as the execution error of the comparison */
  errorProbability: number;
  subjects: number;
  /** the session's own payoffs and δ (the comparison values strategies at the league's) */
  payoffs: { R: number; S: number; T: number; P: number };
  delta: number;
}

/**
 * Sessions of the course with a finished strategy-frequency estimate of that session alone, the
 * newest estimate of each, newest session first.
 */
export async function classEstimates(courseId: number): Promise<ClassEstimate[]> {
  const sessions = new Map((await listCourseSessions(courseId)).map((s) => [s.id, s]));
  const rows = await db()
    .select({ id: estimates.id, request: estimates.request, result: estimates.result })
    .from(estimates)
    .where(and(eq(estimates.courseId, courseId), eq(estimates.status, 'done')))
    .orderBy(desc(estimates.id))
    .limit(500);
  const out = new Map<number, ClassEstimate>();
  for (const r of rows) {
    const req = estimateRequestSchema.safeParse(r.request);
    if (!req.success || req.data.source.kind !== 'sessions' || req.data.source.sessionIds.length !== 1) continue;
    const sessionId = req.data.source.sessionIds[0];
    const s = sessions.get(sessionId);
    const g = (r.result as EstimateResult | null)?.groups?.[0];
    if (!s || !g || out.has(sessionId)) continue;
    out.set(sessionId, {
      sessionId,
      sessionName: s.treatment,
      simulated: s.simulated,
      estimateId: r.id,
      window: req.data.window,
      strategies: g.strategies,
      shares: g.shares,
      beta: g.beta,
      errorProbability: g.errorProbability,
      subjects: g.subjects,
      payoffs: s.design.payoffs,
      delta: s.design.delta,
    });
  }
  return [...out.values()].sort((a, b) => b.sessionId - a.sessionId);
}

/** Keeps the session the results page compares with (null: none). False: no such league or session in the course. */
export async function setComparisonSession(courseId: number, leagueId: number, sessionId: number | null): Promise<boolean> {
  if (sessionId !== null && (await getCourseSessions(courseId, [sessionId])).length === 0) return false;
  const [res] = await db()
    .update(leagues)
    .set({ comparisonSessionId: sessionId })
    .where(and(eq(leagues.courseId, courseId), eq(leagues.id, leagueId)));
  return res.affectedRows === 1;
}

// ---------------------------------------------------------------------------------------------
// Participants

export interface ParticipantLeagueSummary {
  id: number;
  courseId: number;
  courseTitle: string;
  title: string;
  state: LeagueState;
  deadline: Date | null;
  /** entries are accepted now (open and before the deadline) */
  accepting: boolean;
  hasEntry: boolean;
}

/** Every league of the courses where the user is a participant, newest first (see the top of the file). */
export async function leaguesForParticipant(userId: number): Promise<ParticipantLeagueSummary[]> {
  const rows = await db()
    .select({
      id: leagues.id,
      courseId: leagues.courseId,
      courseTitle: courses.title,
      title: leagues.title,
      state: leagues.state,
      deadline: leagues.deadline,
      entryId: leagueEntries.id,
    })
    .from(leagues)
    .innerJoin(courses, eq(courses.id, leagues.courseId))
    .innerJoin(
      courseMembers,
      and(eq(courseMembers.courseId, leagues.courseId), eq(courseMembers.userId, userId), eq(courseMembers.role, 'participant')),
    )
    .leftJoin(leagueEntries, and(eq(leagueEntries.leagueId, leagues.id), eq(leagueEntries.userId, userId)))
    .where(isNull(courses.archivedAt))
    .orderBy(desc(leagues.id));
  const now = new Date();
  return rows.map(({ entryId, ...r }) => ({ ...r, accepting: acceptsEntries(r, now), hasEntry: entryId !== null }));
}

export interface ParticipantLeague {
  league: {
    id: number;
    courseId: number;
    courseTitle: string;
    title: string;
    design: LeagueDesign;
    deadline: Date | null;
    state: LeagueState;
    accepting: boolean;
  };
  /** the user's own entry, if any */
  entry: LeagueEntry | null;
  /** the name an entry gets unless the participant gives another (their name in the course) */
  defaultName: string;
  /** only once published */
  results: LeagueResults | null;
}

/** A league as one participant sees it; null unless the user is a participant of its course. */
export async function participantLeague(leagueId: number, userId: number): Promise<ParticipantLeague | null> {
  const [r] = await db()
    .select({ ...leagueColumns, courseTitle: courses.title, memberName })
    .from(leagues)
    .innerJoin(courses, eq(courses.id, leagues.courseId))
    .innerJoin(
      courseMembers,
      and(eq(courseMembers.courseId, leagues.courseId), eq(courseMembers.userId, userId), eq(courseMembers.role, 'participant')),
    )
    .innerJoin(users, eq(users.id, courseMembers.userId))
    .where(eq(leagues.id, leagueId));
  if (!r) return null;
  const [entry] = await db()
    .select(entryColumns)
    .from(leagueEntries)
    .where(and(eq(leagueEntries.leagueId, leagueId), eq(leagueEntries.userId, userId)));
  return {
    league: {
      id: r.id,
      courseId: r.courseId,
      courseTitle: r.courseTitle,
      title: r.title,
      design: r.design,
      deadline: r.deadline,
      state: r.state,
      accepting: acceptsEntries(r),
    },
    entry: entry ?? null,
    defaultName: (r.memberName ?? '').trim().slice(0, LEAGUE_ENTRY_NAME_MAX) || `Participant ${userId}`,
    results: r.state === 'published' ? r.results : null,
  };
}

export type SaveEntryResult =
  | { ok: true; entry: LeagueEntry }
  | { ok: false; reason: 'not-found'; issues: AutomatonIssue[] }
  | { ok: false; reason: 'not-open' | 'past-deadline' | 'full' | 'invalid'; issues: AutomatonIssue[] };

const entryNameSchema = z
  .string({ error: 'Give your entry a name.' })
  .trim()
  .min(1, 'Give your entry a name.')
  .max(LEAGUE_ENTRY_NAME_MAX, `Keep the name to ${LEAGUE_ENTRY_NAME_MAX} characters.`);

/**
 * Saves (creates or replaces) a participant's entry. `automaton` is untrusted input in the
 * in-memory form (app/lib/automata.ts: states counted from 0); it is checked with the strategy
 * rules and the league's cap (leagueEntryIssues) and stored as a parley-strategy v1 file. The
 * state and the deadline are checked on the locked league row, so an entry cannot slip in as
 * the league closes. Refusals store nothing.
 */
export async function saveEntry(leagueId: number, userId: number, input: { name: unknown; automaton: unknown }): Promise<SaveEntryResult> {
  const issues: AutomatonIssue[] = [];
  const name = entryNameSchema.safeParse(input.name);
  if (!name.success) issues.push({ path: 'name', message: name.error.issues[0].message });
  const raw = input.automaton;
  const states = raw !== null && typeof raw === 'object' && 'states' in raw ? (raw as { states: unknown }).states : undefined;
  if (Array.isArray(states) && states.length > 100) {
    // far past any cap: say so without walking it
    issues.push({ path: 'states', message: `A league entry may have at most 6 states (this one has ${states.length}).` });
  } else {
    issues.push(...leagueEntryIssues({ id: 'entry', name: 'entry', states: states as Automaton['states'] }));
  }
  if (issues.length) return { ok: false, reason: 'invalid', issues };
  // only the fields we know are kept (an automaton from a form may carry anything else)
  const automaton: Automaton = {
    // the file's id says nothing of the person; exports name it E<entry id> (app/lib/league-export.ts)
    id: 'entry',
    name: name.data!,
    states: (states as Automaton['states']).map((s) => ({
      action: s.action,
      next: { cc: s.next.cc, cd: s.next.cd, dc: s.next.dc, dd: s.next.dd },
    })),
  };
  const strategy = toStrategyFile(automaton);
  return db().transaction(async (tx): Promise<SaveEntryResult> => {
    const l = await lockedLeague(tx, leagueId);
    const [member] = l
      ? await tx
          .select({ id: courseMembers.id })
          .from(courseMembers)
          .where(and(eq(courseMembers.courseId, l.courseId), eq(courseMembers.userId, userId), eq(courseMembers.role, 'participant')))
      : [];
    if (!l || !member) return { ok: false, reason: 'not-found', issues: [{ path: 'league', message: 'No such league in your courses.' }] };
    if (l.state !== 'open')
      return { ok: false, reason: 'not-open', issues: [{ path: 'league', message: 'This league no longer takes entries.' }] };
    if (l.deadline !== null && l.deadline.getTime() <= Date.now())
      return { ok: false, reason: 'past-deadline', issues: [{ path: 'league', message: 'The deadline for entries has passed.' }] };
    const [own] = await tx
      .select({ id: leagueEntries.id })
      .from(leagueEntries)
      .where(and(eq(leagueEntries.leagueId, leagueId), eq(leagueEntries.userId, userId)));
    if (own) {
      await tx.update(leagueEntries).set({ name: automaton.name, strategy, updatedAt: new Date() }).where(eq(leagueEntries.id, own.id));
    } else {
      const [{ n }] = await tx.select({ n: count() }).from(leagueEntries).where(eq(leagueEntries.leagueId, leagueId));
      if (n >= LEAGUE_MAX_ENTRIES)
        return { ok: false, reason: 'full', issues: [{ path: 'league', message: `This league is full (${LEAGUE_MAX_ENTRIES} entries).` }] };
      await tx.insert(leagueEntries).values({ leagueId, userId, house: false, name: automaton.name, strategy });
    }
    const [entry] = await tx
      .select(entryColumns)
      .from(leagueEntries)
      .where(and(eq(leagueEntries.leagueId, leagueId), eq(leagueEntries.userId, userId)));
    return { ok: true, entry };
  });
}

// ---------------------------------------------------------------------------------------------
// The run: a job (app/jobs), so a league of 200 entries does not hold up a request, and a process
// that dies mid-run leaves it to another.

export type StartRun = { ok: true; league: League } | { ok: false; message: string };

/**
 * Queues the run of a closed league (or the rerun of one that has run). The league row is moved
 * to run status `queued` by a conditional UPDATE, so a second click while queued or running
 * queues nothing more.
 */
export async function startLeagueRun(courseId: number, leagueId: number): Promise<StartRun | null> {
  const league = await getLeague(courseId, leagueId);
  if (!league) return null;
  const [{ n }] = await db().select({ n: count() }).from(leagueEntries).where(eq(leagueEntries.leagueId, leagueId));
  if (n < 2) return { ok: false, message: 'A league needs at least two entries to run.' };
  const queued = await db().transaction(async (tx) => {
    const [res] = await tx
      .update(leagues)
      .set({ runStatus: 'queued', runProgress: 0, runTotal: 0, runError: null })
      .where(
        and(
          eq(leagues.courseId, courseId),
          eq(leagues.id, leagueId),
          inArray(leagues.state, ['closed', 'run']),
          inArray(leagues.runStatus, ['none', 'done', 'failed']),
        ),
      );
    if (res.affectedRows === 0) return false;
    // `again`: a run still going on older entries (the league was reopened and closed since) runs once more
    await enqueue(leagueRunJob, { leagueId }, { courseId, key: `league-run:${leagueId}`, again: true, tx });
    return true;
  });
  const now = (await getLeague(courseId, leagueId))!;
  if (!queued) {
    return {
      ok: false,
      message:
        now.runStatus === 'queued' || now.runStatus === 'running'
          ? 'The league is already being run.'
          : 'Close the league to entries before running it.',
    };
  }
  kickJobs();
  return { ok: true, league: now };
}

export interface LeagueStatus {
  state: LeagueState;
  runStatus: LeagueRunStatus;
  progress: number;
  total: number;
  error: string | null;
  runAt: string | null;
}

/** What the league page polls while a run is queued or running. */
export async function leagueStatus(courseId: number, leagueId: number): Promise<LeagueStatus | null> {
  const [r] = await db()
    .select({
      state: leagues.state,
      runStatus: leagues.runStatus,
      progress: leagues.runProgress,
      total: leagues.runTotal,
      error: leagues.runError,
      runAt: leagues.runAt,
    })
    .from(leagues)
    .where(and(eq(leagues.courseId, courseId), eq(leagues.id, leagueId)));
  return r ? { ...r, runAt: r.runAt?.toISOString() ?? null } : null;
}

export const leagueRunJob = defineJob({
  kind: 'league-run',
  payload: z.object({ leagueId: z.number().int().positive() }),
  concurrency: 1,
  run: ({ leagueId }) => runLeague(leagueId),
  failed: async ({ leagueId }, message) => {
    await db().update(leagues).set({ runStatus: 'failed', runError: message }).where(eq(leagues.id, leagueId));
  },
});

async function runLeague(leagueId: number): Promise<void> {
  const [row] = await db().select(leagueColumns).from(leagues).where(eq(leagues.id, leagueId));
  if (!row || (row.state !== 'closed' && row.state !== 'run')) return;
  const entries = await listEntries(leagueId);
  const n = entries.length;
  // (conditional: a league reopened since it was queued is not marked running)
  const [started] = await db()
    .update(leagues)
    .set({ runStatus: 'running', runProgress: 0, runTotal: (n * (n + 1)) / 2 })
    .where(and(eq(leagues.id, leagueId), inArray(leagues.state, ['closed', 'run']), inArray(leagues.runStatus, ['queued', 'running'])));
  if (started.affectedRows === 0) return;
  const snapshot: ResultEntry[] = entries.map((e) => ({ entryId: e.id, name: e.name, house: e.house, strategy: e.strategy }));
  const results = await computeLeagueOnWorker(row.design, snapshot);
  // The run stores its results only if the league was not reopened (or queued anew) meanwhile:
  // a newer request set the status back to queued, and runs again after this one (enqueue's `again`).
  await db()
    .update(leagues)
    .set({
      results,
      state: 'run',
      runAt: new Date(),
      runStatus: 'done',
      runProgress: (n * (n + 1)) / 2,
      runError: null,
    })
    .where(and(eq(leagues.id, leagueId), inArray(leagues.state, ['closed', 'run']), eq(leagues.runStatus, 'running')));
}
