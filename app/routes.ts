import { type RouteConfig, index, layout, prefix, route } from '@react-router/dev/routes';

export default [
  index('routes/home.tsx'),
  route('healthz', 'routes/healthz.ts'),

  // Sign-in by e-mailed one-time code (phone first).
  route('sign-in', 'routes/auth/sign-in.tsx'),
  route('sign-in/code', 'routes/auth/sign-in-code.tsx'),
  route('sign-in/link', 'routes/auth/sign-in-link.ts'),
  route('sign-out', 'routes/auth/sign-out.ts'),
  route('account', 'routes/account.tsx'),
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
    // Data in and out (docs/decisions/020-*.md).
    route('courses/:courseId/data', 'routes/staff/data.tsx'),
    route('courses/:courseId/roster', 'routes/staff/roster.tsx'),
    route('courses/:courseId/datasets', 'routes/staff/datasets.tsx'),
    route('courses/:courseId/datasets/:datasetId/estimate', 'routes/staff/dataset-estimate.tsx'),
    route('courses/:courseId/sessions/:sessionId/results', 'routes/staff/session-results.tsx'),
    route('settings/tokens', 'routes/staff/tokens.tsx'),
    // Debrief (staff): choose sessions, one session, several side by side.
    route('courses/:courseId/debrief', 'routes/debrief/choose.tsx'),
    route('courses/:courseId/debrief/compare', 'routes/debrief/compare.tsx'),
    route('courses/:courseId/debrief/:sessionId', 'routes/debrief/session.tsx'),
    // Strategy leagues (issue 15): list, create, one league (entries, close, run, publish), results.
    route('courses/:courseId/leagues', 'routes/staff/leagues.tsx'),
    route('courses/:courseId/leagues/new', 'routes/staff/league-new.tsx'),
    route('courses/:courseId/leagues/:leagueId', 'routes/staff/league.tsx'),
    route('courses/:courseId/leagues/:leagueId/results', 'routes/staff/league-results.tsx'),
    // How the Debrief's figures are computed; every chart caption links to its section.
    route('methods', 'routes/staff/methods.tsx'),
  ]),
  route('courses/:courseId/data/panel', 'routes/data/panel.ts'),
  route('courses/:courseId/data/codebook.csv', 'routes/data/codebook.ts'),
  route('courses/:courseId/sessions/:sessionId/credit.csv', 'routes/data/credit.ts'),
  route('courses/:courseId/sessions/:sessionId/result-mails', 'routes/data/result-mails.ts'),
  route('courses/:courseId/leagues/:leagueId/status', 'routes/data/league-status.ts'),
  route('courses/:courseId/leagues/:leagueId/export/:file', 'routes/data/league-export.ts'),

  // The research API (bearer tokens; JSON errors). Documented in README.md.
  ...prefix('api/v1', [
    route('courses', 'routes/api/courses.ts'),
    route('courses/:courseId', 'routes/api/course.ts'),
    route('courses/:courseId/sessions', 'routes/api/sessions.ts'),
    route('courses/:courseId/estimates', 'routes/api/estimates.ts'),
    route('sessions/:sessionId', 'routes/api/session.ts'),
    route('sessions/:sessionId/panel', 'routes/api/panel.ts'),
    route('leagues', 'routes/api/leagues.ts'),
    route('leagues/:leagueId', 'routes/api/league.ts'),
    route('*', 'routes/api/not-found.ts'),
  ]),

  // Debrief outside the staff shell: the projector (full screen) and resource routes (chart data
  // as CSV, estimations started and polled as JSON).
  route('courses/:courseId/debrief/projector', 'routes/debrief/projector.tsx'),
  route('courses/:courseId/debrief/csv/:chart', 'routes/debrief/csv.ts'),
  route('courses/:courseId/estimates', 'routes/debrief/estimates.ts'),
  route('courses/:courseId/estimates/:estimateId', 'routes/debrief/estimate-status.ts'),

  route('courses/:courseId/strategies', 'routes/staff/strategies.ts'),
  route('courses/:courseId/sessions/:sessionId/names', 'routes/staff/session-names.ts'),
  route('courses/:courseId/sessions/:sessionId/comprehension', 'routes/staff/session-comprehension.ts'),

  // The projector page (dark, large type) and the participants' phone pages.
  route('screen/:sessionId', 'routes/big-screen.tsx'),
  // A strategy league's reveal on the projector (staff; run or published leagues).
  route('courses/:courseId/leagues/:leagueId/reveal', 'routes/league-reveal.tsx'),
  // Phone pages share a layout only for its error boundary: an error keeps the phone shell.
  layout('routes/play/layout.tsx', [
    route('join', 'routes/play/join.tsx'),
    route('join/:code', 'routes/play/join-code.tsx'),
    // Before the lobby, when the design asks for them (issue 12): the comprehension check, a practice supergame.
    route('join/:code/check', 'routes/play/join-check.tsx'),
    route('join/:code/practice', 'routes/play/join-practice.tsx'),
    route('play/:sessionId', 'routes/play/play.tsx'),
    // A strategy league: the participant's entry, and the results once published (issue 15).
    route('play/leagues/:leagueId', 'routes/play/league.tsx'),
    // A participant's own summary of a session (outside the staff shell).
    route('courses/:courseId/debrief/:sessionId/mine', 'routes/debrief/mine.tsx'),
  ]),

  route('*', 'routes/not-found.tsx'),
] satisfies RouteConfig;
