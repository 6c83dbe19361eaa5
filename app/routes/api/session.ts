// GET /api/v1/sessions/:sessionId — one session with its frozen design (no personal data).
import type { Route } from './+types/session';
import { apiJson, notAllowed, requireApiSession, requireApiToken, sessionJson } from '#app/utils/api.server';

export async function loader({ request, params }: Route.LoaderArgs) {
  const caller = await requireApiToken(request);
  return apiJson({ data: sessionJson(await requireApiSession(caller, params.sessionId)) });
}

export const action = notAllowed;
