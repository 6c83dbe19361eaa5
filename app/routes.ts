import { type RouteConfig, index, layout, prefix, route } from '@react-router/dev/routes';

export default [
  index('routes/home.tsx'),
  route('healthz', 'routes/healthz.ts'),

  // Sign-in by e-mailed one-time code (phone first).
  route('sign-in', 'routes/auth/sign-in.tsx'),
  route('sign-in/code', 'routes/auth/sign-in-code.tsx'),
  route('sign-in/link', 'routes/auth/sign-in-link.ts'),
  route('sign-out', 'routes/auth/sign-out.ts'),
  route('invitations/:token', 'routes/invitation.tsx'),

  // Staff pages (desktop first): instructors, assistants, researchers, site admins.
  layout('routes/staff/layout.tsx', [
    route('courses', 'routes/staff/courses.tsx'),
    route('courses/new', 'routes/staff/course-new.tsx'),
    route('courses/:courseId', 'routes/staff/course.tsx'),
    route('courses/:courseId/members', 'routes/staff/members.tsx'),
    route('courses/:courseId/designs', 'routes/staff/designs.tsx'),
    route('courses/:courseId/designs/new', 'routes/staff/design-edit.tsx', { id: 'design-new' }),
    route('courses/:courseId/designs/:designId', 'routes/staff/design-edit.tsx', { id: 'design-edit' }),
    route('admin', 'routes/staff/admin.tsx'),
    // Data in and out (docs/decisions/020-*.md).
    route('courses/:courseId/data', 'routes/staff/data.tsx'),
    route('courses/:courseId/roster', 'routes/staff/roster.tsx'),
    route('courses/:courseId/datasets', 'routes/staff/datasets.tsx'),
    route('courses/:courseId/sessions/:sessionId/results', 'routes/staff/session-results.tsx'),
    route('settings/tokens', 'routes/staff/tokens.tsx'),
  ]),
  route('courses/:courseId/data/panel', 'routes/data/panel.ts'),
  route('courses/:courseId/data/codebook.csv', 'routes/data/codebook.ts'),
  route('courses/:courseId/sessions/:sessionId/credit.csv', 'routes/data/credit.ts'),
  route('courses/:courseId/sessions/:sessionId/result-mails', 'routes/data/result-mails.ts'),

  // The research API (bearer tokens; JSON errors). Documented in README.md and /api-docs.
  ...prefix('api/v1', [
    route('courses', 'routes/api/courses.ts'),
    route('courses/:courseId', 'routes/api/course.ts'),
    route('courses/:courseId/sessions', 'routes/api/sessions.ts'),
    route('courses/:courseId/estimates', 'routes/api/estimates.ts'),
    route('sessions/:sessionId', 'routes/api/session.ts'),
    route('sessions/:sessionId/panel', 'routes/api/panel.ts'),
    route('*', 'routes/api/not-found.ts'),
  ]),

  route('courses/:courseId/strategies', 'routes/staff/strategies.ts'),

  route('*', 'routes/not-found.tsx'),
] satisfies RouteConfig;
