// GET /api/v1/courses/:courseId
import type { Route } from './+types/course';
import { apiJson, notAllowed, parseApiId, requireApiCourse, requireApiToken } from '#app/utils/api.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const c = await requireApiCourse(caller, parseApiId(params.courseId, 'course'));
  return apiJson({ data: { id: c.id, title: c.title, institution: c.institution, term: c.term, is_demo: c.isDemo, role: c.role } });
}

export const action = notAllowed;
