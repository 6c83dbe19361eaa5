// The research API's plumbing: bearer-token authentication, course scope, JSON errors
// ({ error: { code, message } } with the HTTP status) and limit/cursor pagination.
import { eq } from 'drizzle-orm';
import { z } from 'zod';
import { API_ROLES, findApiToken, touchApiToken } from '#app/models/api-tokens.server';
import { treatmentOf } from '#app/lib/treatment';
import { getSession } from '#app/models/live.server';
import type { Session } from '#app/models/session-row.server';
import { courses, users } from '#drizzle/schema';
import { isAdminEmail } from './auth.server';
import { db } from './db.server';
import { courseRoleOf } from './permissions.server';

export function apiJson(body: unknown, init: ResponseInit = {}) {
  return new Response(JSON.stringify(body), {
    ...init,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...init.headers },
  });
}

export function apiError(status: number, code: string, message: string, headers: Record<string, string> = {}) {
  return apiJson({ error: { code, message } }, { status, headers });
}

/** Throws a JSON error response (a resource route hands it to the client as it is). */
export function apiFail(status: number, code: string, message: string): never {
  throw apiError(status, code, message, status === 401 ? { 'www-authenticate': 'Bearer realm="parley"' } : {});
}

export interface ApiCaller {
  tokenId: number;
  userId: number;
  isAdmin: boolean;
  courseIds: number[];
}

export async function requireApiToken(request: Request): Promise<ApiCaller> {
  const header = request.headers.get('authorization');
  if (!header)
    apiFail(401, 'missing_token', 'Send a token: Authorization: Bearer <token> (create one in Parley under Settings → API tokens).');
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
  if (!m) apiFail(401, 'invalid_token', 'The Authorization header must read "Bearer <token>".');
  const token = await findApiToken(m[1]);
  if (!token) apiFail(401, 'invalid_token', 'This token is not known to Parley.');
  if (token.revokedAt) apiFail(401, 'revoked_token', 'This token was revoked. Create a new one in Settings → API tokens.');
  const [user] = await db().select({ email: users.email }).from(users).where(eq(users.id, token.userId));
  if (!user) apiFail(401, 'invalid_token', 'This token’s owner no longer exists.');
  await touchApiToken(token.id);
  return { tokenId: token.id, userId: token.userId, isAdmin: isAdminEmail(user.email), courseIds: token.courseIds };
}

export function parseApiId(raw: string | undefined, what: string): number {
  const id = Number(raw);
  if (!raw || !/^\d+$/.test(raw) || !Number.isSafeInteger(id) || id <= 0) apiFail(404, 'not_found', `No such ${what}.`);
  return id;
}

/**
 * The course, if the token may read it: unknown → 404; not in the token's scope, or the owner is
 * no longer instructor or researcher there → 403.
 */
export async function requireApiCourse(caller: ApiCaller, courseId: number) {
  const [course] = await db()
    .select({ id: courses.id, title: courses.title, institution: courses.institution, term: courses.term, isDemo: courses.isDemo })
    .from(courses)
    .where(eq(courses.id, courseId));
  if (!course) apiFail(404, 'not_found', 'No such course.');
  if (!caller.courseIds.includes(courseId)) apiFail(403, 'out_of_scope', 'This token is not scoped to that course.');
  const role = await courseRoleOf(courseId, { id: caller.userId, isAdmin: caller.isAdmin });
  if (!role || !(API_ROLES as readonly string[]).includes(role))
    apiFail(403, 'forbidden', 'The token’s owner is no longer an instructor or researcher of that course.');
  return { ...course, role };
}

const Page = z.object({
  limit: z.coerce.number().int('limit must be a whole number').min(1, 'limit must be at least 1').optional(),
  cursor: z.string().max(200).optional(),
});

/** `?limit=&cursor=`; a bad value is a 400 with the reason. */
export function pageParams(request: Request, defaults: { limit: number; max: number }) {
  const url = new URL(request.url);
  const parsed = Page.safeParse({ limit: url.searchParams.get('limit') ?? undefined, cursor: url.searchParams.get('cursor') ?? undefined });
  if (!parsed.success) apiFail(400, 'bad_request', parsed.error.issues[0].message);
  const limit = parsed.data.limit ?? defaults.limit;
  if (limit > defaults.max) apiFail(400, 'bad_request', `limit must be at most ${defaults.max}`);
  return { limit, cursor: parsed.data.cursor ?? null };
}

/** Cursors of id-ordered lists: the last id seen, opaque to clients. */
export const idCursor = {
  encode: (id: number) => Buffer.from(`id:${id}`).toString('base64url'),
  decode(raw: string | null): number {
    if (raw === null) return 0;
    const m = /^id:(\d+)$/.exec(Buffer.from(raw, 'base64url').toString('utf8'));
    if (!m) apiFail(400, 'bad_request', 'cursor is not one this API gave out');
    return Number(m[1]);
  },
};

/** A page of an id-ordered list fetched with limit + 1 rows: the data and the next cursor. */
export function idPage<Row extends { id: number }>(rows: Row[], limit: number, toJson: (row: Row) => unknown) {
  const page = rows.slice(0, limit);
  return apiJson({ data: page.map(toJson), next_cursor: rows.length > limit ? idCursor.encode(page[page.length - 1].id) : null });
}

export function notAllowed() {
  return apiError(405, 'method_not_allowed', 'The API is read-only: use GET.', { allow: 'GET' });
}

export function sessionJson(s: Session) {
  const { design } = s;
  return {
    id: s.id,
    course_id: s.courseId,
    treatment: s.treatment,
    // the treatment's identity: sessions with equal keys ran the same game (docs/decisions/027)
    treatment_key: treatmentOf(design).key,
    treatment_parameters: treatmentOf(design).label,
    status: s.status,
    simulated: s.simulated,
    payoffs: design.payoffs,
    delta: design.delta,
    supergames: design.supergames,
    created_at: s.createdAt.toISOString(),
    started_at: s.startedAt?.toISOString() ?? null,
    completed_at: s.completedAt?.toISOString() ?? null,
    design: { ...design, instructions: undefined },
  };
}

/** The session if the token may read its course (unknown → 404, out of scope → 403). */
export async function requireApiSession(caller: ApiCaller, raw: string | undefined) {
  const id = parseApiId(raw, 'session');
  const s = await getSession(id);
  if (!s) apiFail(404, 'not_found', 'No such session.');
  await requireApiCourse(caller, s.courseId);
  return s;
}
