import { data } from 'react-router';
import { ErrorPage } from '#app/components/error-page';

// Any address no other route matches: the 404 page, rendered by this route (in the root layout)
// rather than thrown to the root's error boundary.
export function loader() {
  return data(null, { status: 404 });
}

export default function NotFound() {
  return <ErrorPage status={404} message="There is no page at this address." />;
}
