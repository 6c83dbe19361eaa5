// Results e-mails of a session: GET the per-recipient status (polled by the results page),
// POST intent=send (queue everyone not yet mailed) or intent=retry (queue the failed ones again).
import { data } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/result-mails';
import { findPanelSession } from '#app/models/panel-export.server';
import { queueResultMails, resultMailStatus, retryFailedMails, sendQueuedResultMails } from '#app/models/result-mails.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

const Intent = z.object({ intent: z.enum(['send', 'retry'], 'Choose send or retry.') });

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor']);
  const session = await findPanelSession(course.id, parseId(params.sessionId, 'session'));
  respondUnless(session, 404, 'No such session in this course.');
  // (queued mails are a job's to send, resumed after a restart: app/jobs)
  return resultMailStatus(session.id);
}

export async function action({ request, params }: Route.ActionArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor']);
  const session = await findPanelSession(course.id, parseId(params.sessionId, 'session'));
  respondUnless(session, 404, 'No such session in this course.');
  const parsed = Intent.safeParse(Object.fromEntries(await request.formData()));
  if (!parsed.success) return data({ ok: false as const, message: parsed.error.issues[0].message }, { status: 400 });
  if (session.status !== 'complete' && session.status !== 'archived') {
    return data({ ok: false as const, message: 'Results can be e-mailed once the session is complete.' }, { status: 409 });
  }
  const n = parsed.data.intent === 'send' ? await queueResultMails(session.id) : await retryFailedMails(session.id);
  await sendQueuedResultMails(session);
  const message =
    parsed.data.intent === 'send'
      ? n === 0
        ? 'Everyone already has a results e-mail (sent or on its way).'
        : `${n} results e-mail${n === 1 ? '' : 's'} queued.`
      : `${n} failed e-mail${n === 1 ? '' : 's'} queued again.`;
  return { ok: true as const, message };
}
