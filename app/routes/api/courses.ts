// GET /api/v1/courses — the courses this token may read (its scope, where the owner still holds
// the instructor or researcher role), by id; ?limit (≤ 100) &cursor.
import { and, asc, gt, inArray } from 'drizzle-orm';
import type { Route } from './+types/courses';
import { API_ROLES } from '#app/models/api-tokens.server';
import { apiJson, idCursor, notAllowed, pageParams, requireApiToken } from '#app/utils/api.server';
import { db } from '#app/utils/db.server';
import { roleIn } from '#app/utils/permissions.server';
import { courses } from '#drizzle/schema';

export async function loader({ request }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const { limit, cursor } = pageParams(request, { limit: 50, max: 100 });
  const after = idCursor.decode(cursor);
  const scoped = caller.courseIds.filter((id) => id > after);
  const rows = scoped.length
    ? await db()
        .select({ id: courses.id, title: courses.title, institution: courses.institution, term: courses.term, isDemo: courses.isDemo })
        .from(courses)
        .where(and(inArray(courses.id, scoped), gt(courses.id, after)))
        .orderBy(asc(courses.id))
    : [];
  const data = [];
  for (const c of rows) {
    const role = caller.isAdmin ? 'instructor' : await roleIn(c.id, caller.userId);
    if (!role || !(API_ROLES as readonly string[]).includes(role)) continue;
    data.push({ id: c.id, title: c.title, institution: c.institution, term: c.term, is_demo: c.isDemo, role });
    if (data.length === limit + 1) break;
  }
  const more = data.length > limit;
  const page = data.slice(0, limit);
  return apiJson({ data: page, next_cursor: more ? idCursor.encode(page[page.length - 1].id) : null });
}

export const action = notAllowed;
