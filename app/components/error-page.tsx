import { isRouteErrorResponse, Link, useRouteError } from 'react-router';

const WORDS: Record<number, { title: string; text: string }> = {
  400: { title: 'That request did not make sense', text: 'Something in it was malformed. Go back and try again.' },
  403: {
    title: 'Not for your role',
    text: 'Your role in this course does not open this page. If you think it should, ask the course’s instructor.',
  },
  404: { title: 'Nothing here', text: 'There is no page at this address, or what it named no longer exists.' },
  429: { title: 'Too many requests', text: 'Wait a little and try again.' },
  500: { title: 'Something went wrong on our side', text: 'The error has been logged. Try again in a moment.' },
};

export function ErrorPage({
  status,
  message,
  detail,
  inShell = false,
}: {
  status: number;
  message?: string;
  detail?: string;
  inShell?: boolean;
}) {
  const words = WORDS[status] ?? WORDS[500];
  // Inside the staff shell the page already has its <main>; a bare error page is its own.
  const Wrapper = inShell ? 'div' : 'main';
  return (
    <Wrapper
      className={inShell ? 'flex max-w-xl flex-col gap-4 py-6' : 'mx-auto flex min-h-dvh max-w-xl flex-col justify-center gap-4 px-6 py-12'}
    >
      {/* No route's meta runs for an error page: React puts this title in the head. */}
      <title>{`${words.title} · Parley`}</title>
      <p className="text-sm font-semibold tracking-wide text-accent-700 uppercase">Error {status}</p>
      <h1 className="text-3xl font-semibold text-slate-900">{words.title}</h1>
      <p className="text-lg text-slate-700">{message ?? words.text}</p>
      {detail ? <pre className="overflow-auto rounded bg-slate-100 p-4 text-xs">{detail}</pre> : null}
      <p>
        <Link to="/" className="font-semibold text-accent-700 underline underline-offset-4">
          Back to Parley’s start page
        </Link>
      </p>
    </Wrapper>
  );
}

/** The thrown response or error of the route, as an error page (root and staff shell boundaries). */
export function RouteErrorPage({ inShell = false }: { inShell?: boolean }) {
  const error = useRouteError();
  if (isRouteErrorResponse(error)) {
    return <ErrorPage status={error.status} message={typeof error.data === 'string' ? error.data : undefined} inShell={inShell} />;
  }
  const detail = import.meta.env.DEV && error instanceof Error ? error.stack : undefined;
  return <ErrorPage status={500} detail={detail} inShell={inShell} />;
}
