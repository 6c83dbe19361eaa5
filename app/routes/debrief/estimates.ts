// POST: start a strategy-frequency estimation (or get the stored one for the same request).
// JSON in both directions of the page's fetcher: { ok, estimate, reused } or { ok: false, errors }.
import { data } from 'react-router';
import type { Route } from './+types/estimates';
import { startEstimate } from '#app/models/estimate.server';
import { estimateRequestFromForm } from '#app/utils/estimate-form';
import { requireCourseRole, STAFF_ROLES } from '#app/utils/permissions.server';

export async function loader() {
  return Response.json(
    { ok: false, message: 'POST an estimation request here; GET /courses/:courseId/estimates/:id for its status.' },
    { status: 405 },
  );
}

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, STAFF_ROLES);
  const form = await request.formData();
  const parsed = estimateRequestFromForm(form);
  if (!parsed.ok) return data({ ok: false as const, errors: parsed.errors }, { status: 400 });
  // the researcher's explicit choice to estimate same-named sessions of different treatments apart
  const separate = form.get('treatments') === 'separate';
  const started = await startEstimate(course.id, user.id, parsed.request, { separate });
  if (!started.ok) return data({ ok: false as const, code: started.code, message: started.message }, { status: started.status });
  return data({ ok: true as const, estimate: started.estimate, reused: started.reused }, { status: started.reused ? 200 : 202 });
}
