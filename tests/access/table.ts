// THE table of who may reach what: every route in app/routes.ts, keyed by its route file, with
// the HTTP status each kind of visitor must get, and the screens the browser tests visit (390 px
// overflow check and axe-core). A route in app/routes.ts with no entry here fails the access test.
// How to add a route: see DEVELOPERS.md ("Access table").
import { Course, CourseMembership, User } from "~/.server/db/models.server";
import { hashPassword } from "~/.server/passwords.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { GroupMember } from "~/.server/db/groups.server";
import { submissionFixture } from "./submission-fixture";

export const VISITORS = ["signedOut", "admin", "instructor", "demonstrator", "student", "otherStudent"] as const;
export type Visitor = (typeof VISITORS)[number];
export type SignedInVisitor = Exclude<Visitor, "signedOut">;

/** Expected status per visitor, in the order of VISITORS. */
type Statuses = [signedOut: number, admin: number, instructor: number, demonstrator: number, student: number, otherStudent: number];

export interface RouteAccess {
  /** the URL to request; {name} is replaced by fixtures[name] */
  url: string;
  /** status of a GET (redirects not followed); null when GET is not meaningful */
  get: Statuses;
  /** status of a POST with `body` (default: an empty form) */
  post: Statuses;
  body?: Record<string, string>;
  /** the POST ends the caller's session (sign-out): the test signs in again afterwards */
  endsSession?: boolean;
  /** pages the browser tests open at 390 px and check with axe-core, as these visitors */
  screens?: Visitor[];
}

// Shorthands for common rows.
const PAGE_ALL = [302, 200, 200, 200, 200, 200] satisfies Statuses;
const ADMIN_ONLY = [302, 200, 403, 403, 403, 403] satisfies Statuses;
const NO_ACTION_PAGE = [405, 405, 405, 405, 405, 405] satisfies Statuses;
const API_NO_METHOD = [405, 405, 405, 405, 405, 405] satisfies Statuses;

export const ACCESS: Record<string, RouteAccess> = {
  "routes/home.tsx": { url: "/", get: [302, 302, 302, 302, 302, 302], post: NO_ACTION_PAGE },
  "routes/auth/sign-in.tsx": {
    url: "/sign-in",
    get: [200, 302, 302, 302, 302, 302],
    // Signed in, the page's loader sends you on after the (refused) action.
    post: [400, 302, 302, 302, 302, 302],
    screens: ["signedOut"],
  },
  // Single sign-on: the start sends everyone to the fake institution; the return address without a
  // sign-in in progress in this browser is a page saying so.
  "routes/auth/sso-start.tsx": { url: "/sign-in/institution", get: [302, 302, 302, 302, 302, 302], post: [405, 405, 405, 405, 405, 405] },
  "routes/auth/sso-return.tsx": { url: "/sign-in/institution/return?code=x&state=y", get: [400, 400, 400, 400, 400, 400], post: [405, 405, 405, 405, 405, 405], screens: ["signedOut"] },
  // LTI 1.3: login initiation and launch are the platform's to call; without a valid request they
  // send everyone to the page that says why (303); that page without a refused launch is a 404.
  "routes/lti/login.ts": { url: "/lti/login", get: [303, 303, 303, 303, 303, 303], post: [303, 303, 303, 303, 303, 303] },
  "routes/lti/launch.ts": { url: "/lti/launch", get: [303, 303, 303, 303, 303, 303], post: [303, 303, 303, 303, 303, 303] },
  "routes/lti/jwks.ts": { url: "/lti/jwks", get: [200, 200, 200, 200, 200, 200], post: [405, 405, 405, 405, 405, 405] },
  "routes/lti/problem.tsx": { url: "/lti/problem", get: [404, 404, 404, 404, 404, 404], post: NO_ACTION_PAGE, screens: ["signedOut"] },
  "routes/auth/sign-out.tsx": { url: "/sign-out", get: [302, 302, 302, 302, 302, 302], post: [302, 302, 302, 302, 302, 302], endsSession: true },
  "routes/auth/invitation.tsx": { url: "/invitation/{badToken}", get: [200, 200, 200, 200, 200, 200], post: [400, 400, 400, 400, 400, 400], screens: ["signedOut"] },
  "routes/auth/password-forgot.tsx": { url: "/password/forgot", get: [200, 200, 200, 200, 200, 200], post: [400, 400, 400, 400, 400, 400], screens: ["signedOut"] },
  "routes/auth/password-reset.tsx": { url: "/password/reset/{badToken}", get: [200, 200, 200, 200, 200, 200], post: [400, 400, 400, 400, 400, 400], screens: ["signedOut"] },

  "routes/dashboard.tsx": { url: "/dashboard", get: PAGE_ALL, post: [302, 400, 400, 400, 400, 400], screens: ["admin", "instructor", "demonstrator", "student"] },
  "routes/account.tsx": { url: "/account", get: PAGE_ALL, post: [302, 400, 400, 400, 400, 400], screens: ["instructor", "student"] },
  "routes/courses/new.tsx": { url: "/courses/new", get: [302, 200, 200, 403, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor", "student"] },
  "routes/courses/course.tsx": {
    url: "/courses/{course}",
    get: [302, 200, 200, 200, 200, 403],
    post: [302, 400, 400, 403, 403, 403],
    screens: ["admin", "instructor", "demonstrator", "student"],
  },
  "routes/courses/roster.tsx": { url: "/courses/{course}/roster", get: [302, 200, 200, 403, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor"] },
  "routes/courses/groups.tsx": { url: "/courses/{course}/groups", get: [302, 200, 200, 200, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor", "demonstrator"] },
  "routes/courses/reactions.tsx": { url: "/courses/{course}/reactions", get: [302, 200, 200, 200, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor"] },
  "routes/courses/session-new.tsx": { url: "/courses/{course}/sessions/new", get: [302, 200, 200, 403, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor"] },
  "routes/sessions/session.tsx": { url: "/sessions/{session}", get: [302, 200, 200, 200, 200, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor", "demonstrator", "student"] },
  // Reuse: instructors copy a practical (an empty form names each missing field: 400); copying a
  // course also needs an account that may create courses (the demo instructor's may).
  "routes/sessions/copy.tsx": { url: "/sessions/{session}/copy", get: [302, 200, 200, 403, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor"] },
  "routes/courses/copy.tsx": { url: "/courses/{course}/copy", get: [302, 200, 200, 403, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor"] },
  "routes/sessions/sheets.tsx": { url: "/sessions/{session}/sheets", get: [302, 200, 200, 200, 403, 403], post: NO_ACTION_PAGE, screens: ["instructor"] },
  // the demo student's own bench; another group's bench is a 404 for them (tests/integration/planning-access.test.ts)
  "routes/sessions/bench-sheet.tsx": { url: "/sessions/{session}/benches/{bench}/sheet", get: [302, 200, 200, 200, 200, 403], post: NO_ACTION_PAGE, screens: ["student"] },
  "routes/sessions/prep.tsx": { url: "/sessions/{session}/prep", get: [302, 200, 200, 200, 403, 403], post: NO_ACTION_PAGE, screens: ["instructor"] },
  "routes/tools/fit-check.tsx": { url: "/fit-check", get: [302, 200, 200, 200, 403, 403], post: NO_ACTION_PAGE, screens: ["instructor", "demonstrator"] },
  "routes/admin/people.tsx": { url: "/admin/people", get: ADMIN_ONLY, post: [302, 400, 403, 403, 403, 403], screens: ["admin"] },
  "routes/admin/mail.tsx": { url: "/admin/mail", get: ADMIN_ONLY, post: NO_ACTION_PAGE, screens: ["admin"] },
  "routes/admin/audit.tsx": { url: "/admin/audit", get: ADMIN_ONLY, post: NO_ACTION_PAGE, screens: ["admin"] },
  // The job queue: admins read it and retry failed jobs (an empty form is 400).
  "routes/admin/lti.tsx": { url: "/admin/lti", get: ADMIN_ONLY, post: [302, 400, 403, 403, 403, 403], screens: ["admin"] },
  "routes/admin/jobs.tsx": { url: "/admin/jobs", get: ADMIN_ONLY, post: [302, 400, 403, 403, 403, 403], screens: ["admin"] },

  "routes/api/me.ts": { url: "/api/me", get: [401, 200, 200, 200, 200, 200], post: API_NO_METHOD },
  "routes/api/not-found.ts": { url: "/api/no-such-thing", get: [404, 404, 404, 404, 404, 404], post: [404, 404, 404, 404, 404, 404] },
  "routes/api/fit.ts": { url: "/api/fit", get: API_NO_METHOD, post: [401, 400, 400, 400, 403, 403] },
  "routes/api/courses.ts": { url: "/api/courses", get: [401, 200, 200, 200, 200, 200], post: API_NO_METHOD },
  "routes/api/openapi.ts": { url: "/api/openapi.json", get: [200, 200, 200, 200, 200, 200], post: API_NO_METHOD },
  // An empty body is not JSON: 400 for everyone signed in.
  "routes/api/tokens.ts": { url: "/api/tokens", get: API_NO_METHOD, post: [401, 400, 400, 400, 400, 400] },
  // Only DELETE revokes; an unknown id would be 404.
  "routes/api/token.ts": { url: "/api/tokens/999999", get: API_NO_METHOD, post: [401, 405, 405, 405, 405, 405] },

  "routes/api/course-sessions.ts": { url: "/api/courses/{course}/sessions", get: [401, 200, 200, 200, 200, 403], post: API_NO_METHOD },
  "routes/api/session.ts": { url: "/api/sessions/{session}", get: [401, 200, 200, 200, 200, 403], post: API_NO_METHOD },
  // Gradebooks: the course's staff read them; students never (403, a known resource).
  "routes/api/session-gradebook.ts": { url: "/api/sessions/{session}/gradebook", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  "routes/api/course-gradebook.ts": { url: "/api/courses/{course}/gradebook", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  // The pages of the same gradebooks; only instructors (and admins) change the course settings
  // (an empty form is a 400 with each weight's message), demonstrators read only.
  "routes/sessions/gradebook.tsx": { url: "/sessions/{workSession}/gradebook", get: [302, 200, 200, 200, 403, 403], post: NO_ACTION_PAGE, screens: ["instructor", "demonstrator"] },
  "routes/courses/gradebook.tsx": { url: "/courses/{course}/gradebook", get: [302, 200, 200, 200, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor", "demonstrator"] },
  // Each person's own remembered table views; an empty body is not JSON (400).
  "routes/api/table-view.ts": { url: "/api/table-views/course-gradebook", get: [401, 200, 200, 200, 200, 200], post: [401, 400, 400, 400, 400, 400] },
  // Spreadsheet downloads: as the gradebook API (staff read; students 403; signed out 401 JSON,
  // not a sign-in redirect: scripts fetch them, with a token). Not pages, so no screens.
  "routes/courses/export-xlsx.ts": { url: "/courses/{course}/export.xlsx", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  "routes/courses/export-csv.ts": { url: "/courses/{course}/export.csv", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  "routes/sessions/export-xlsx.ts": { url: "/sessions/{session}/export.xlsx", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  "routes/sessions/export-csv.ts": { url: "/sessions/{session}/export.csv", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  "routes/sessions/benches-xlsx.ts": { url: "/sessions/{session}/benches.xlsx", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  "routes/sessions/benches-csv.ts": { url: "/sessions/{session}/benches.csv", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  "routes/api/feed-check.ts": { url: "/api/feed-check", get: API_NO_METHOD, post: [401, 400, 400, 400, 403, 403] },
  // Uploads, feedback and review: staff of the course and the group's own student; another
  // course's student is refused (403: not in the course). A page upload needs multipart (415).
  "routes/groups/submissions.tsx": { url: "/groups/{group}/submissions", get: [302, 200, 200, 200, 200, 403], post: [302, 415, 415, 415, 415, 403], screens: ["student", "instructor"] },
  "routes/submissions/submission.tsx": { url: "/submissions/{submission}", get: [302, 200, 200, 200, 200, 403], post: NO_ACTION_PAGE, screens: ["student", "instructor"] },
  "routes/sessions/platform-marks.tsx": { url: "/sessions/{workSession}/platform-marks", get: [302, 200, 200, 403, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor"] },
  "routes/sessions/review.tsx": { url: "/sessions/{workSession}/review", get: [302, 200, 200, 200, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor", "demonstrator"] },
  "routes/sessions/review-submission.tsx": { url: "/sessions/{workSession}/review/{submission}", get: [302, 200, 200, 200, 403, 403], post: [302, 400, 400, 400, 403, 403], screens: ["instructor", "demonstrator"] },
  // Class results: staff read; only instructors (and admins) change exclusions (an empty form is 400 for them).
  "routes/sessions/class-results.tsx": { url: "/sessions/{workSession}/class-results", get: [302, 200, 200, 200, 403, 403], post: [302, 400, 400, 403, 403, 403], screens: ["instructor", "demonstrator"] },
  "routes/api/class-results.ts": { url: "/api/sessions/{workSession}/class-results", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  // The dashboard's live figures: course staff only (JSON; a student's dashboard does not poll).
  "routes/dashboard-live.ts": { url: "/dashboard/live", get: [401, 200, 200, 200, 403, 403], post: API_NO_METHOD },
  "routes/api/group-submissions.ts": { url: "/api/groups/{group}/submissions", get: [401, 200, 200, 200, 200, 403], post: [401, 415, 415, 415, 415, 403] },
  "routes/api/submission-preview.ts": { url: "/api/groups/{group}/submissions/preview", get: API_NO_METHOD, post: [401, 415, 415, 415, 415, 403] },
  "routes/api/submission.ts": { url: "/api/submissions/{submission}", get: [401, 200, 200, 200, 200, 403], post: API_NO_METHOD },
  "routes/api/submission-original.ts": { url: "/api/submissions/{submission}/original", get: [401, 200, 200, 200, 200, 403], post: API_NO_METHOD },

  // The load balancer's probe: anyone, no personal data (JSON; no action).
  "routes/healthz.ts": { url: "/healthz", get: [200, 200, 200, 200, 200, 200], post: API_NO_METHOD },

  "routes/not-found.tsx": { url: "/no-such-page", get: [404, 404, 404, 404, 404, 404], post: NO_ACTION_PAGE, screens: ["signedOut", "student"] },
};

/** The sign-ins of the visitors (demo accounts; the other course's student is made by `makeFixtures`). */
export const SIGN_INS: Record<SignedInVisitor, { email: string; password: string }> = {
  admin: { email: "admin@demo.ratebook.invalid", password: "demo-admin-pass" },
  instructor: { email: "instructor@demo.ratebook.invalid", password: "demo-instructor-pass" },
  demonstrator: { email: "demonstrator@demo.ratebook.invalid", password: "demo-demonstrator-pass" },
  student: { email: "student@demo.ratebook.invalid", password: "demo-student-pass" },
  otherStudent: { email: "other-course-student@demo.ratebook.invalid", password: "other-course-student-pass" },
};

/**
 * What the URLs above need, made once per test run: the demo course, and a second course whose
 * only student is the "otherStudent" visitor. Add a fixture for a new kind of id here.
 */
export async function makeFixtures(): Promise<Record<string, string>> {
  const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
  const [other] = await Course.findOrCreate({ where: { code: "ACCESS-OTHER", term: "Access test" }, defaults: { code: "ACCESS-OTHER", title: "Another course (test)", term: "Access test" } });
  const { email, password } = SIGN_INS.otherStudent;
  let student = await User.findOne({ where: { email } });
  student ??= await User.create({ email, displayName: "Other-course student (test)", role: "member", passwordHash: await hashPassword(password) });
  await CourseMembership.findOrCreate({ where: { courseId: other.id, userId: student.id }, defaults: { courseId: other.id, userId: student.id, role: "student" } });
  const work = await submissionFixture();
  const session = await LabSession.findOne({ where: { courseId: course!.id }, order: [["id", "ASC"]] });
  const demoStudent = await User.findOne({ where: { email: SIGN_INS.student.email } });
  const group = await GroupMember.findOne({ where: { courseId: course!.id, userId: demoStudent!.id } });
  const bench = await Bench.findOne({ where: { sessionId: session!.id, groupId: group!.groupId } });
  return { course: String(course!.id), otherCourse: String(other.id), badToken: "not-a-real-token", session: String(session!.id), bench: String(bench!.id),
    group: String(work.groupId), workSession: String(work.sessionId), submission: String(work.submissionId),
  };
}

export function fillUrl(url: string, fixtures: Record<string, string>) {
  return url.replace(/\{(\w+)\}/g, (_, name: string) => {
    if (!(name in fixtures)) throw new Error(`no fixture {${name}} (add it to makeFixtures in tests/access/table.ts)`);
    return fixtures[name];
  });
}
