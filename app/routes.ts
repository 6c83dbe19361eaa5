import { type RouteConfig, index, layout, route } from '@react-router/dev/routes';

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
    route('courses/:courseId/sessions', 'routes/staff/sessions.tsx'),
    route('courses/:courseId/sessions/:sessionId', 'routes/staff/conductor.tsx'),
    route('courses/:courseId/sessions/:sessionId/floor', 'routes/staff/floor.tsx'),
    route('admin', 'routes/staff/admin.tsx'),
  ]),

  route('courses/:courseId/strategies', 'routes/staff/strategies.ts'),
  route('courses/:courseId/sessions/:sessionId/names', 'routes/staff/session-names.ts'),

  // The projector page (dark, large type) and the participants' phone pages.
  route('screen/:sessionId', 'routes/big-screen.tsx'),
  route('join', 'routes/play/join.tsx'),
  route('join/:code', 'routes/play/join-code.tsx'),
  route('play/:sessionId', 'routes/play/play.tsx'),

  route('*', 'routes/not-found.tsx'),
] satisfies RouteConfig;
