// The Debrief of the sessions a URL names (?sessions=1,2&include=…), or a 404 when one is not in
// the course: the first steps of the comparison page, the projector and the chart downloads.
import { type DebriefOptions, includeParam, loadDebrief } from '#app/models/debrief.server';
import { respondUnless, sessionIdsParam } from '#app/utils/http.server';

export async function debriefFromUrl(courseId: number, url: URL, opts: Omit<DebriefOptions, 'include'> = {}) {
  const ids = sessionIdsParam(url);
  const include = includeParam(url);
  const debrief = await loadDebrief(courseId, ids, { ...opts, include });
  respondUnless(debrief, 404, 'One of the sessions is not in this course.');
  return { ...debrief, ids, include };
}
