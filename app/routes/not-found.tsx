import { ErrorPage } from '#app/components/error-page';

export function loader() {
  throw new Response('There is no page at this address.', { status: 404 });
}

export default function NotFound() {
  return <ErrorPage status={404} />;
}
