// Helpers for live-session tests: a design in the database, opening through the real page action,
// joining through the real join page, and socket.io clients with the real sign-in cookie.
import { io, type Socket } from 'socket.io-client';
import { designSchema, type DesignInput } from '#app/lib/design';
import { and, eq, sql } from 'drizzle-orm';
import { designs, sessionLog } from '#drizzle/schema';
import type { ClientToServerEvents, ServerToClientEvents } from '#realtime/protocol';
import type { ParticipantView } from '#realtime/engine/types';
import { createCourse, createUser, testDb } from './db';
import { baseUrl, type Client, signIn, uniqueEmail } from './http';

export type TestSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

export async function createDesign(courseId: number, createdBy: number, over: Partial<DesignInput> = {}) {
  const params = designSchema.parse({ payoffs: { R: 40, S: 12, T: 50, P: 25 }, delta: 0.5, supergames: 2, roundSeconds: 60, ...over });
  const [res] = await testDb()
    .insert(designs)
    .values({ courseId, name: `Test design ${Date.now()}`, params, createdBy });
  return res.insertId;
}

/** A complete, valid design form as the editor posts it. */
export function designForm(over: Record<string, string> = {}) {
  return {
    name: 'Treatment A',
    'payoffs.R': '40',
    'payoffs.S': '12',
    'payoffs.T': '50',
    'payoffs.P': '25',
    'labels.C': 'X',
    'labels.D': 'Y',
    delta: '0.75',
    supergames: '10',
    roundSeconds: '20',
    'termination.kind': 'standard',
    'oddCount.kind': 'computer',
    'oddCount.strategy': 'TFT',
    timeout: 'repeat-last',
    'credit.kind': 'participation',
    'credit.credit': '1',
    instructions: '',
    ...over,
  };
}

export async function openSession(instructor: Client, courseId: number, designId: number, extra: Record<string, string> = {}) {
  const res = await instructor.post(`/courses/${courseId}/sessions`, {
    designId,
    admission: 'roster',
    seed: '',
    emailDomain: '',
    ...extra,
  });
  if (res.status !== 302) throw new Error(`opening answered ${res.status}: ${(await res.text()).slice(0, 300)}`);
  const sessionId = Number(/sessions\/(\d+)/.exec(res.headers.get('location')!)![1]);
  const page = await (await instructor.get(`/courses/${courseId}/sessions/${sessionId}`)).text();
  const code = /data-testid="join-code">([A-Z0-9]{6})</.exec(page)?.[1];
  if (!code) throw new Error('no join code on the conductor page');
  return { sessionId, code };
}

export async function join(participant: Client, code: string, fields: Record<string, string> = {}) {
  const res = await participant.post(`/join/${code}`, fields);
  if (res.status !== 302) throw new Error(`joining answered ${res.status}: ${(await res.text()).slice(0, 300)}`);
  return res.headers.get('location')!;
}

const open: TestSocket[] = [];

export function connect(cookie: string, url = baseUrl()): Promise<TestSocket> {
  // The Origin a browser on Parley's pages sends (the hub refuses other origins).
  const s: TestSocket = io(url, {
    transports: ['websocket'],
    extraHeaders: { cookie, origin: new URL(url).origin },
    reconnection: false,
    forceNew: true,
  });
  open.push(s);
  return new Promise((resolve, reject) => {
    s.on('connect', () => resolve(s));
    s.on('connect_error', reject);
  });
}

export function closeSockets() {
  while (open.length) open.pop()!.close();
}

/** Resolves with the first participant view (already received or next) that satisfies `test`. */
export function nextView(s: TestSocket, test: (v: ParticipantView) => boolean, ms = 15_000): Promise<ParticipantView> {
  return new Promise((resolve, reject) => {
    const t = setTimeout(() => {
      s.off('view:participant', on);
      reject(new Error('no matching participant view in time'));
    }, ms);
    const on = (v: ParticipantView) => {
      if (!test(v)) return;
      clearTimeout(t);
      s.off('view:participant', on);
      resolve(v);
    };
    s.on('view:participant', on);
  });
}

export interface CourseSetUp {
  /** the design's fields over createDesign's defaults */
  design?: Partial<DesignInput>;
  /** begins every e-mail address made (which test made it) */
  tag?: string;
  /** the course's title */
  title?: string;
  /** the participants' names (none by default) */
  playerName?: (i: number) => string;
}

/**
 * The set-up most live tests start from: a course with an instructor and `n` participants (users
 * made, each signed in over HTTP through the real flow) and one design.
 */
export async function courseOf(n: number, o: CourseSetUp = {}) {
  const tag = o.tag ?? 'class';
  const instructorEmail = uniqueEmail(`${tag}-inst`);
  const instructorId = await createUser(instructorEmail, 'Instructor');
  const playerEmails = Array.from({ length: n }, (_, i) => uniqueEmail(`${tag}-p${i}`));
  const playerIds = await Promise.all(playerEmails.map((e, i) => createUser(e, o.playerName?.(i) ?? null)));
  const courseId = await createCourse(o.title ?? `Class ${tag}`, [
    { userId: instructorId, role: 'instructor' },
    ...playerIds.map((userId) => ({ userId, role: 'participant' as const })),
  ]);
  const designId = await createDesign(courseId, instructorId, o.design);
  const instructor = await signIn(instructorEmail);
  const players = await Promise.all(playerEmails.map((e) => signIn(e)));
  return { courseId, designId, instructor, instructorId, players, playerIds, playerEmails };
}

export interface ClassSetUp extends CourseSetUp {
  /** fields of the form that opens the session (seed, …) */
  open?: Record<string, string>;
  /** false: the participants do not join (the test joins them its own way) */
  join?: boolean;
}

/** courseOf, then a session opened through the real page action and joined by every participant. */
export async function classOf(n: number, o: ClassSetUp = {}) {
  const course = await courseOf(n, o);
  const { sessionId, code } = await openSession(course.instructor, course.courseId, course.designId, o.open);
  if (o.join !== false) for (const p of course.players) await join(p, code);
  return { ...course, sessionId, code };
}

/** The `grace` rows of a session's log: one per restart, outage or takeover that found rounds waiting. */
export async function gracesOf(sessionId: number) {
  return testDb()
    .select()
    .from(sessionLog)
    .where(and(eq(sessionLog.sessionId, sessionId), sql`JSON_EXTRACT(${sessionLog.event}, '$.type') = 'grace'`));
}
