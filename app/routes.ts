// The map of every URL, grouped by area. Route files live in folders by the same areas.
import { type RouteConfig, index, layout, prefix, route } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),

  // Signing in and out, invitations and password resets (no session needed).
  route("sign-in", "routes/auth/sign-in.tsx"),
  // Single sign-on through the institution's OpenID Connect provider (off unless configured).
  route("sign-in/institution", "routes/auth/sso-start.tsx"),
  route("sign-in/institution/return", "routes/auth/sso-return.tsx"),
  // LTI 1.3 launches from a registered learning platform (login initiation, the signed launch,
  // and the page that says why a launch was refused).
  ...prefix("lti", [
    route("login", "routes/lti/login.ts"),
    route("launch", "routes/lti/launch.ts"),
    route("problem", "routes/lti/problem.tsx"),
    route("jwks", "routes/lti/jwks.ts"),
  ]),
  route("sign-out", "routes/auth/sign-out.tsx"),
  route("invitation/:token", "routes/auth/invitation.tsx"),
  ...prefix("password", [
    route("forgot", "routes/auth/password-forgot.tsx"),
    route("reset/:token", "routes/auth/password-reset.tsx"),
  ]),

  // Everything below needs a signed-in person; the layout's loader checks it, and so does every
  // child loader and action itself (loaders run in parallel).
  layout("routes/signed-in-layout.tsx", [
    route("dashboard", "routes/dashboard.tsx"),
    route("account", "routes/account.tsx"),
    ...prefix("courses", [
      route("new", "routes/courses/new.tsx"),
      route(":courseId", "routes/courses/course.tsx"),
      ...prefix(":courseId", [
        route("roster", "routes/courses/roster.tsx"),
        route("groups", "routes/courses/groups.tsx"),
        route("reactions", "routes/courses/reactions.tsx"),
        route("sessions/new", "routes/courses/session-new.tsx"),
        route("gradebook", "routes/courses/gradebook.tsx"),
        route("copy", "routes/courses/copy.tsx"),
      ]),
    ]),
    // Practicals: the plan, printable bench sheets, the prep list and the gradebook.
    route("sessions/:sessionId", "routes/sessions/session.tsx"),
    ...prefix("sessions/:sessionId", [
      route("sheets", "routes/sessions/sheets.tsx"),
      route("benches/:benchId/sheet", "routes/sessions/bench-sheet.tsx"),
      route("prep", "routes/sessions/prep.tsx"),
      route("gradebook", "routes/sessions/gradebook.tsx"),
      route("copy", "routes/sessions/copy.tsx"),
    ]),
    // Uploads and feedback (a group's own pages).
    route("groups/:groupId/submissions", "routes/groups/submissions.tsx"),
    route("submissions/:submissionId", "routes/submissions/submission.tsx"),
    // Review and results of a practical (staff).
    ...prefix("sessions/:sessionId", [
      route("review", "routes/sessions/review.tsx"),
      route("review/:submissionId", "routes/sessions/review-submission.tsx"),
      route("class-results", "routes/sessions/class-results.tsx"),
      route("platform-marks", "routes/sessions/platform-marks.tsx"),
    ]),
    route("fit-check", "routes/tools/fit-check.tsx"),
    ...prefix("admin", [
      route("people", "routes/admin/people.tsx"),
      route("mail", "routes/admin/mail.tsx"),
      route("audit", "routes/admin/audit.tsx"),
      route("jobs", "routes/admin/jobs.tsx"),
      route("lti", "routes/admin/lti.tsx"),
    ]),
  ]),

  // The dashboard's live figures (JSON for the dashboard's polling; a resource route, not the API).
  route("dashboard/live", "routes/dashboard-live.ts"),

  // Spreadsheet downloads of the gradebooks (resource routes beside their pages' areas: staff
  // only, answered like the API: 401/403/404 JSON; a Bearer token works as on the API).
  ...prefix("courses/:courseId", [
    route("export.xlsx", "routes/courses/export-xlsx.ts"),
    route("export.csv", "routes/courses/export-csv.ts"),
  ]),
  ...prefix("sessions/:sessionId", [
    route("export.xlsx", "routes/sessions/export-xlsx.ts"),
    route("export.csv", "routes/sessions/export-csv.ts"),
    // the bench assignment for the prep room, beside the printable prep list
    route("benches.xlsx", "routes/sessions/benches-xlsx.ts"),
    route("benches.csv", "routes/sessions/benches-csv.ts"),
  ]),

  // The load balancer's probe: no sign-in, no personal data.
  route("healthz", "routes/healthz.ts"),

  // JSON API (resource routes).
  ...prefix("api", [
    route("me", "routes/api/me.ts"),
    route("fit", "routes/api/fit.ts"),
    route("courses", "routes/api/courses.ts"),
    route("openapi.json", "routes/api/openapi.ts"),
    route("tokens", "routes/api/tokens.ts"),
    route("tokens/:tokenId", "routes/api/token.ts"),
    route("courses/:courseId/sessions", "routes/api/course-sessions.ts"),
    route("courses/:courseId/gradebook", "routes/api/course-gradebook.ts"),
    route("sessions/:sessionId", "routes/api/session.ts"),
    route("sessions/:sessionId/gradebook", "routes/api/session-gradebook.ts"),
    route("sessions/:sessionId/class-results", "routes/api/class-results.ts"),
    route("table-views/:tableKey", "routes/api/table-view.ts"),
    route("feed-check", "routes/api/feed-check.ts"),
    route("groups/:groupId/submissions", "routes/api/group-submissions.ts"),
    route("groups/:groupId/submissions/preview", "routes/api/submission-preview.ts"),
    route("submissions/:submissionId", "routes/api/submission.ts"),
    route("submissions/:submissionId/original", "routes/api/submission-original.ts"),
    // Any other /api/ path: 404 JSON, never the HTML page.
    route("*", "routes/api/not-found.ts"),
  ]),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
