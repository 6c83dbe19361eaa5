// Choice-panel downloads of a course: GET de-identified (instructors, researchers), POST the
// identified export (instructors only, after confirming the personal-data caution; logged).
import { z } from 'zod';
import type { Route } from './+types/panel';
import { logExport } from '#app/models/exports.server';
import { type PanelSession, panelCsvStream, panelJsonStream, panelSessions, panelZipStream } from '#app/models/panel-export.server';
import { respond, respondUnless } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

const Query = z.object({
  session: z.array(z.coerce.number().int().positive()).min(1, 'Choose at least one session.').max(100, 'At most 100 sessions at once.'),
  format: z.enum(['csv', 'json', 'zip']).default('csv'),
});
const Identified = Query.extend({
  confirm: z.literal('yes', { error: 'Confirm that you will handle the personal data under your institution’s rules.' }),
});

function fields(entries: Iterable<[string, FormDataEntryValue]>) {
  const out: Record<string, unknown> = { session: [] as string[] };
  for (const [k, v] of entries) {
    if (k === 'session') (out.session as string[]).push(String(v));
    else out[k] = String(v);
  }
  return out;
}

async function sessionsOf(courseId: number, ids: number[]): Promise<PanelSession[]> {
  const list = await panelSessions(courseId, ids);
  respondUnless(list.length === new Set(ids).size, 404, 'One of the sessions is not in this course.');
  return list;
}

function download(course: { id: number; title: string }, list: PanelSession[], format: 'csv' | 'json' | 'zip', identified: boolean) {
  const base = `parley-${list.length === 1 ? `session-${list[0].id}` : `course-${course.id}`}-panel${identified ? '-IDENTIFIED' : ''}`;
  const headers = (type: string, ext: string) => ({
    'content-type': type,
    'content-disposition': `attachment; filename="${base}.${ext}"`,
    'cache-control': 'no-store',
  });
  const opts = { identified };
  if (format === 'zip') return new Response(panelZipStream(course.title, list, opts), { headers: headers('application/zip', 'zip') });
  if (format === 'json') return new Response(panelJsonStream(list, opts), { headers: headers('application/json; charset=utf-8', 'json') });
  return new Response(panelCsvStream(list, opts), { headers: headers('text/csv; charset=utf-8', 'csv') });
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor', 'researcher']);
  const parsed = Query.safeParse(fields(new URL(request.url).searchParams));
  if (!parsed.success) respond(400, parsed.error.issues[0].message);
  const list = await sessionsOf(course.id, parsed.data.session);
  return download(course, list, parsed.data.format, false);
}

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  const parsed = Identified.safeParse(fields(await request.formData()));
  if (!parsed.success) respond(400, parsed.error.issues[0].message);
  const list = await sessionsOf(course.id, parsed.data.session);
  for (const s of list) await logExport(course.id, s.id, user.id, 'panel-identified');
  return download(course, list, parsed.data.format, true);
}
