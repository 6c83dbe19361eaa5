import { data } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/strategies';
import { LIBRARY, PROFILES } from '#app/lib/automata';
import { validateAutomaton } from '#app/lib/automaton-check';
import { saveCourseStrategy } from '#app/models/design.server';
import { respond } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

const StateSchema = z.object({
  action: z.enum(['C', 'D']),
  next: z.object(Object.fromEntries(PROFILES.map((p) => [p, z.number().int().min(0)])) as Record<(typeof PROFILES)[number], z.ZodNumber>),
});
const AutomatonSchema = z.object({
  id: z
    .string()
    .trim()
    .regex(/^[A-Za-z0-9][A-Za-z0-9_-]{0,23}$/, 'Use 1–24 letters, digits, - or _ for the short name.')
    .refine((id) => !LIBRARY.some((a) => a.id.toLowerCase() === id.toLowerCase()), 'That short name belongs to a library strategy.'),
  name: z.string().trim().min(1, 'Describe the strategy in a few words.').max(120),
  states: z.array(StateSchema).min(1).max(12),
});

// Saves a strategy built in the checker to the course (instructors only).
export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  const form = await request.formData();
  let raw: unknown;
  try {
    raw = JSON.parse(String(form.get('automaton') ?? ''));
  } catch {
    return data({ ok: false, errors: { form: 'The strategy could not be read.' } }, { status: 400 });
  }
  const parsed = AutomatonSchema.safeParse(raw);
  if (!parsed.success) {
    const errors: Record<string, string> = {};
    for (const i of parsed.error.issues) errors[String(i.path[0] ?? 'form')] ??= i.message;
    return data({ ok: false, errors }, { status: 400 });
  }
  const issues = validateAutomaton(parsed.data);
  if (issues.length) return data({ ok: false, errors: { states: issues[0].message } }, { status: 400 });
  const res = await saveCourseStrategy(course.id, user.id, parsed.data);
  if (!res.ok) return data({ ok: false, errors: { [res.field]: res.message } }, { status: 400 });
  return { ok: true, message: `${parsed.data.id} saved: it is now in this course’s list.` };
}

export function loader() {
  respond(404, 'Not found');
}
