// Any other /api/v1/… path: a JSON 404, never the HTML page.
import { apiError } from '#app/utils/api.server';

export function loader() {
  return apiError(404, 'not_found', 'No such API resource. See the API section of Parley’s README.');
}

export const action = loader;
