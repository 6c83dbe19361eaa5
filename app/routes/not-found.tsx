import { ErrorPage } from '#app/components/error-page';
import { respond } from '#app/utils/http.server';

export function loader() {
  respond(404, 'There is no page at this address.');
}

export default function NotFound() {
  return <ErrorPage status={404} />;
}
