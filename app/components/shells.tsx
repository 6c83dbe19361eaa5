import type { ReactNode } from 'react';
import { Form, Link, NavLink } from 'react-router';
import { cx, DemoBadge } from './ui';

export function Wordmark({ className }: { className?: string }) {
  return (
    <Link to="/" className={cx('inline-flex items-center gap-2 font-bold tracking-wide text-accent-800', className)}>
      <svg aria-hidden="true" viewBox="0 0 32 32" className="size-7">
        <rect width="32" height="32" rx="7" fill="currentColor" />
        <path d="M9 9h7.5a5 5 0 0 1 0 10H13v4H9z" fill="#fff" />
        <circle cx="16.3" cy="14" r="2" fill="currentColor" />
      </svg>
      <span className="text-lg">Parley</span>
    </Link>
  );
}

/** Participant pages: one thumb on a 360–430 px screen. */
export function ParticipantShell({ children, email }: { children: ReactNode; email?: string | null }) {
  return (
    <div className="flex min-h-dvh flex-col">
      <header className="flex items-center justify-between border-b border-slate-200 bg-white px-4 py-3">
        <Wordmark />
        {email ? (
          <div className="flex items-center gap-1">
            <Link
              to="/account"
              className="min-h-11 content-center px-2 text-sm font-semibold text-accent-700 underline-offset-4 hover:underline"
            >
              Sign-ins
            </Link>
            <Form method="post" action="/sign-out">
              <button className="min-h-11 px-2 text-sm font-semibold text-accent-700 underline-offset-4 hover:underline">Sign out</button>
            </Form>
          </div>
        ) : null}
      </header>
      <main className="mx-auto flex w-full max-w-md flex-1 flex-col gap-6 px-4 py-6">{children}</main>
    </div>
  );
}

export interface StaffNavUser {
  email: string;
  isAdmin: boolean;
}

/** Staff pages: desktop first, dense but quiet. */
export function StaffShell({ user, children }: { user: StaffNavUser; children: ReactNode }) {
  const link = ({ isActive }: { isActive: boolean }) =>
    cx('rounded-md px-3 py-2 font-semibold', isActive ? 'bg-accent-50 text-accent-800' : 'text-slate-700 hover:bg-slate-100');
  return (
    <div className="flex min-h-dvh flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:bg-white focus:p-2">
        Skip to content
      </a>
      <header className="border-b border-slate-200 bg-white">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2 sm:px-6">
          <Wordmark />
          <nav aria-label="Main" className="flex flex-1 flex-wrap gap-1">
            <NavLink to="/courses" className={link} end>
              Courses
            </NavLink>
            {user.isAdmin ? (
              <NavLink to="/admin" className={link}>
                Site admin
              </NavLink>
            ) : null}
          </nav>
          <div className="flex items-center gap-3 text-sm text-slate-600">
            <Link to="/account" className="hidden min-h-11 content-center hover:underline sm:inline" title="Signed in as — your sign-ins">
              {user.email}
            </Link>
            <Form method="post" action="/sign-out">
              <button className="min-h-11 rounded-md px-3 font-semibold text-accent-700 hover:bg-accent-50">Sign out</button>
            </Form>
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-7xl flex-1 px-4 py-6 sm:px-6">
        {children}
      </main>
      <footer className="border-t border-slate-200 px-6 py-4 text-center text-sm text-slate-500">
        Parley — repeated-game experiments for teaching and research
      </footer>
    </div>
  );
}

export function PageHeader({ title, children, eyebrow }: { title: string; children?: ReactNode; eyebrow?: ReactNode }) {
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div className="flex flex-col gap-1">
        {eyebrow ? <div className="text-sm text-slate-600">{eyebrow}</div> : null}
        <h1 className="text-2xl font-semibold text-slate-900 sm:text-3xl">{title}</h1>
      </div>
      {children ? <div className="flex flex-wrap gap-2">{children}</div> : null}
    </div>
  );
}

/** The breadcrumb above a course page's title: the course, further steps, the demo badge. */
export function CourseCrumbs({
  course,
  trail = [],
}: {
  course: { id: number; title: string; isDemo: boolean };
  trail?: { to: string; label: string }[];
}) {
  const link = 'text-accent-700 underline-offset-4 hover:underline';
  return (
    <span className="flex flex-wrap items-center gap-2">
      <Link to={`/courses/${course.id}`} className={link}>
        {course.title}
      </Link>
      {trail.map((t) => (
        <span key={t.to} className="contents">
          <span aria-hidden="true">/</span>
          <Link to={t.to} className={link}>
            {t.label}
          </Link>
        </span>
      ))}
      {course.isDemo ? <DemoBadge /> : null}
    </span>
  );
}
