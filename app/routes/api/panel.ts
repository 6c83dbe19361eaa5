// GET /api/v1/sessions/:sessionId/panel — the de-identified choice panel (codebook: the Data page
// and README). ?format=json (default): pages of ?limit (≤ 5000) rows with next_cursor;
// ?format=csv: the whole panel, streamed.
import type { Route } from './+types/panel';
import { decodeCursor, encodeCursor, panelCsvStream, panelPage, panelSessions } from '#app/models/panel-export.server';
import { apiFail, apiJson, notAllowed, pageParams, requireApiSession, requireApiToken } from '#app/utils/api.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  const s = await requireApiSession(caller, params.sessionId);
  const list = await panelSessions(s.courseId, [s.id]);
  const format = new URL(request.url).searchParams.get('format') ?? 'json';
  if (format === 'csv') {
    return new Response(panelCsvStream(list), {
      headers: {
        'content-type': 'text/csv; charset=utf-8',
        'content-disposition': `attachment; filename="parley-session-${s.id}-panel.csv"`,
        'cache-control': 'no-store',
      },
    });
  }
  if (format !== 'json') apiFail(400, 'bad_request', 'format must be json or csv');
  const { limit, cursor } = pageParams(request, { limit: 1000, max: 5000 });
  const after = cursor === null ? null : decodeCursor(cursor);
  if (cursor !== null && (!after || after.session !== s.id))
    apiFail(400, 'bad_request', 'cursor is not one this API gave out for this session');
  const page = await panelPage(list, limit, after);
  return apiJson({ data: page.rows, next_cursor: page.next ? encodeCursor(page.next) : null });
}

export const action = notAllowed;
