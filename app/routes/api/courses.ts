// GET /api/v1/courses — the courses this token may read (its scope, where the owner still holds
// the instructor or researcher role), by id; ?limit (≤ 100) &cursor.
import type { Route } from './+types/courses';
import { API_ROLES } from '#app/models/api-tokens.server';
import { coursesAfter } from '#app/models/course.server';
import { apiJson, idCursor, notAllowed, pageParams, requireApiToken } from '#app/utils/api.server';
import { courseRoleOf } from '#app/utils/permissions.server';

export async function loader({ request }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const { limit, cursor } = pageParams(request, { limit: 50, max: 100 });
  const after = idCursor.decode(cursor);
  const scoped = caller.courseIds.filter((id) => id > after);
  const rows = await coursesAfter(scoped, after);
  const data = [];
  for (const c of rows) {
    const role = await courseRoleOf(c.id, { id: caller.userId, isAdmin: caller.isAdmin });
    if (!role || !(API_ROLES as readonly string[]).includes(role)) continue;
    data.push({ id: c.id, title: c.title, institution: c.institution, term: c.term, is_demo: c.isDemo, role });
    if (data.length === limit + 1) break;
  }
  const more = data.length > limit;
  const page = data.slice(0, limit);
  return apiJson({ data: page, next_cursor: more ? idCursor.encode(page[page.length - 1].id) : null });
}

export const action = notAllowed;
