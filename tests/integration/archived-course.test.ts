// Archived means read-only everywhere (issue 15): every write action on a course's data answers
// 409 with the reason and changes nothing, whoever asks (the admin too); reads still work; the
// one change an archived course takes is coming out of the archive. The refusal is one check in
// the policy (guards.server.ts refuseWriteIfArchived), so the list below must name every route
// module with an action, apart from those that touch no course.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { QueryTypes } from "sequelize";
import { action as courseAction, loader as courseLoader } from "~/routes/courses/course";
import { action as rosterAction } from "~/routes/courses/roster";
import { action as groupsAction } from "~/routes/courses/groups";
import { action as platformMarksAction } from "~/routes/sessions/platform-marks";
import { action as reactionsAction } from "~/routes/courses/reactions";
import { action as sessionNewAction } from "~/routes/courses/session-new";
import { action as courseGradebookAction } from "~/routes/courses/gradebook";
import { action as sessionAction, loader as sessionLoader } from "~/routes/sessions/session";
import { action as reviewAction } from "~/routes/sessions/review";
import { action as reviewSubmissionAction } from "~/routes/sessions/review-submission";
import { action as classResultsAction } from "~/routes/sessions/class-results";
import { action as groupUploadPage } from "~/routes/groups/submissions";
import { action as apiUpload } from "~/routes/api/group-submissions";
import { action as apiPreview } from "~/routes/api/submission-preview";
import { action as feedCheck } from "~/routes/api/feed-check";
import { getSequelize } from "~/.server/db/sequelize.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { Course, User } from "~/.server/db/models.server";
import { hashPassword } from "~/.server/passwords.server";
import { ARCHIVED_READ_ONLY } from "~/.server/guards.server";
import { call, payloadOf, request, signInAs, statusOf } from "./helpers";
import { makePractical, uploadRequest, PASSWORD, type Practical } from "./practical-fixture";

let p: Practical;
let instructor: string;
let student: string;
let admin: string;
let adminUser: User;
let submissionId: number;
const CSV = "t / s,CA (mol/L)\n0,0.0200\n60,0.0186\n120,0.0174\n180,0.0163\n240,0.0153\n";

// Route modules with an action that touch no course's data (accounts, sign-in, tokens, admin
// pages, the engine, table views, answering one's own invitation).
const NOT_COURSE_WRITES = new Set([
  "account.tsx", "admin/jobs.tsx", "admin/people.tsx", "api/fit.ts", "api/table-view.ts", "api/token.ts", "api/tokens.ts",
  "auth/invitation.tsx", "auth/password-forgot.tsx", "auth/password-reset.tsx", "auth/sign-in.tsx", "auth/sign-out.tsx",
  "courses/new.tsx", "dashboard.tsx",
  // copies read the archived course and write into another one (reuse.server.ts refuses archived targets)
  "courses/copy.tsx", "sessions/copy.tsx",
  // platform registrations are the admin's; a launch into an archived course is refused by the
  // launch itself (its own page, "course-archived", in app/.server/lti/launch.server.ts)
  "admin/lti.tsx", "lti/launch.ts", "lti/login.ts",
]);

beforeAll(async () => {
  p = await makePractical("ARCH-T", { groups: 2 });
  instructor = await signInAs(p.instructor.email, PASSWORD);
  student = await signInAs(p.students[0].email, PASSWORD);
  adminUser = await User.create({ email: "arch-admin@test.ratebook.invalid", displayName: "Arch Admin (invented)", role: "admin", passwordHash: await hashPassword(PASSWORD) });
  admin = await signInAs(adminUser.email, PASSWORD);
  const first = (await call(apiUpload, uploadRequest(`/api/groups/${p.groups[0].id}/submissions`, student, { bytes: CSV, name: "run.csv" }), { groupId: String(p.groups[0].id) })) as Response;
  expect(first.status).toBe(202);
  submissionId = ((await first.json()) as { id: number }).id;
  const archived = await call(courseAction, request(`/courses/${p.course.id}`, { cookie: instructor, form: { intent: "archive" } }), { courseId: String(p.course.id) });
  expect(statusOf(archived)).toBe(200);
});
afterAll(async () => {
  await p.course.destroy();
  await adminUser.destroy();
  await closeSequelize();
});

/** Rows of the course's data, to show nothing changed. */
async function snapshot() {
  const [row] = await getSequelize().query<Record<string, string>>(
    `select
       (select count(*) from course_memberships where course_id = $1) as memberships,
       (select count(*) from groups where course_id = $1) as groups,
       (select string_agg(name, ',' order by id) from groups where course_id = $1) as group_names,
       (select count(*) from group_members where course_id = $1) as group_members,
       (select count(*) from reaction_systems where course_id = $1) as reactions,
       (select count(*) from lab_sessions where course_id = $1) as practicals,
       (select string_agg(title || coalesce(deadline::text, '') || status, ',') from lab_sessions where course_id = $1) as practical_text,
       (select string_agg(coalesce(b.group_id::text, '-') || b.ca0::text, ',' order by b.id) from benches b join lab_sessions s on s.id = b.session_id where s.course_id = $1) as benches,
       (select count(*) from submissions s join groups g on g.id = s.group_id where g.course_id = $1) as submissions,
       (select count(*) from submission_comments c join submissions s on s.id = c.submission_id join groups g on g.id = s.group_id where g.course_id = $1) as comments,
       (select count(*) from audit_log) as audits,
       (select count(*) from graphile_worker.jobs) as jobs`,
    { bind: [p.course.id], type: QueryTypes.SELECT },
  );
  return row;
}

function multipart(path: string, cookie: string, field: string, name: string, text: string) {
  const form = new FormData();
  form.append(field, new File([text], name, { type: "text/csv" }));
  return new Request(`http://127.0.0.1:3100${path}`, { method: "POST", body: form, headers: { Cookie: cookie, Origin: "http://127.0.0.1:3100" } });
}

describe("an archived course is read-only everywhere", () => {
  test("every write action answers 409 with the reason and changes nothing (instructor, admin, student)", async () => {
    const c = String(p.course.id);
    const s = String(p.session.id);
    const g = String(p.groups[0].id);
    const sub = String(submissionId);
    const memberId = String((await getSequelize().query<{ id: number }>("select id from course_memberships where course_id = $1 and role = 'student' limit 1", { bind: [p.course.id], type: QueryTypes.SELECT }))[0].id);
    const rosterRows = JSON.stringify([{ row: 2, studentNumber: "A1", name: "Late Student (invented)", email: "late.student@test.ratebook.invalid", group: "G1" }]);
    type Case = [module: string, handler: (args: any) => unknown, req: (cookie: string) => Request, params: Record<string, string>];
    const form = (path: string, body: Record<string, string>) => (cookie: string) => request(path, { cookie, form: body });
    const cases: Case[] = [
      ["courses/course.tsx", courseAction, form(`/courses/${c}`, { intent: "invite", email: "late@test.ratebook.invalid", displayName: "Late (invented)", role: "student" }), { courseId: c }],
      ["courses/course.tsx", courseAction, form(`/courses/${c}`, { intent: "change-role", membershipId: memberId, role: "demonstrator" }), { courseId: c }],
      ["courses/course.tsx", courseAction, form(`/courses/${c}`, { intent: "remove-member", membershipId: memberId }), { courseId: c }],
      ["courses/roster.tsx", rosterAction, (cookie) => multipart(`/courses/${c}/roster`, cookie, "roster", "class.csv", "Student ID,Name,E-mail\nA1,Late Student (invented),late.student@test.ratebook.invalid\n"), { courseId: c }],
      ["courses/roster.tsx", rosterAction, form(`/courses/${c}/roster`, { intent: "confirm", rows: rosterRows }), { courseId: c }],
      ["courses/roster.tsx", rosterAction, form(`/courses/${c}/roster`, { intent: "add-demonstrator", email: "late.demo@test.ratebook.invalid", displayName: "Late Demo (invented)" }), { courseId: c }],
      ["courses/groups.tsx", groupsAction, form(`/courses/${c}/groups`, { intent: "create", name: "New group" }), { courseId: c }],
      ["courses/groups.tsx", groupsAction, form(`/courses/${c}/groups`, { intent: "rename", groupId: g, name: "Renamed" }), { courseId: c }],
      ["courses/groups.tsx", groupsAction, form(`/courses/${c}/groups`, { intent: "delete", groupId: String(p.groups[1].id) }), { courseId: c }],
      ["courses/groups.tsx", groupsAction, form(`/courses/${c}/groups`, { intent: "move", userId: String(p.students[0].id), groupId: String(p.groups[1].id) }), { courseId: c }],
      ["courses/groups.tsx", groupsAction, form(`/courses/${c}/groups`, { intent: "form", size: "2" }), { courseId: c }],
      ["courses/reactions.tsx", reactionsAction, form(`/courses/${c}/reactions`, { name: "Another (invented)" }), { courseId: c }],
      ["courses/session-new.tsx", sessionNewAction, form(`/courses/${c}/sessions/new`, { intent: "save", title: "Late practical" }), { courseId: c }],
      ["courses/gradebook.tsx", courseGradebookAction, form(`/courses/${c}/gradebook`, { intent: "settings", [`weight-${s}`]: "3" }), { courseId: c }],
      ["sessions/session.tsx", sessionAction, form(`/sessions/${s}`, { intent: "assign-auto" }), { sessionId: s }],
      ["sessions/session.tsx", sessionAction, form(`/sessions/${s}`, { intent: "assign", [`bench-${p.benches[0].id}`]: "", [`was-bench-${p.benches[0].id}`]: g }), { sessionId: s }],
      ["sessions/session.tsx", sessionAction, form(`/sessions/${s}`, { intent: "notify" }), { sessionId: s }],
      ["sessions/session.tsx", sessionAction, form(`/sessions/${s}`, { intent: "edit-bench", benchId: String(p.benches[0].id), CA0: "0.05" }), { sessionId: s }],
      ["sessions/session.tsx", sessionAction, form(`/sessions/${s}`, { intent: "edit-details", title: "Edited title", deadline: "" }), { sessionId: s }],
      ["sessions/review.tsx", reviewAction, form(`/sessions/${s}/review`, { intent: "release" }), { sessionId: s }],
      ["sessions/review.tsx", reviewAction, form(`/sessions/${s}/review`, { intent: "check-unflagged", ids: sub }), { sessionId: s }],
      ...(["exclude", "include", "override", "clear-override", "comment", "checked", "unchecked"] as const).map((intent): Case => [
        "sessions/review-submission.tsx", reviewSubmissionAction,
        form(`/sessions/${s}/review/${sub}`, { intent, row: "2", reason: "late", mark: "80", body: "A comment" }), { sessionId: s, submissionId: sub },
      ]),
      ["sessions/platform-marks.tsx", platformMarksAction, form(`/sessions/${s}/platform-marks`, { intent: "resend" }), { sessionId: s }],
      ["sessions/class-results.tsx", classResultsAction, form(`/sessions/${s}/class-results`, { intent: "exclude", benchId: String(p.benches[0].id), reason: "late" }), { sessionId: s }],
      ["groups/submissions.tsx", groupUploadPage, (cookie) => uploadRequest(`/groups/${g}/submissions`, cookie, { bytes: CSV, name: "again.csv" }), { groupId: g }],
      ["api/group-submissions.ts", apiUpload, (cookie) => uploadRequest(`/api/groups/${g}/submissions`, cookie, { bytes: CSV, name: "again.csv" }), { groupId: g }],
      ["api/submission-preview.ts", apiPreview, (cookie) => uploadRequest(`/api/groups/${g}/submissions/preview`, cookie, { bytes: CSV, name: "again.csv" }), { groupId: g }],
    ];

    // every route module with an action is either here or touches no course
    const routesDir = path.resolve(__dirname, "../../app/routes");
    const withAction = (fs.readdirSync(routesDir, { recursive: true }) as string[])
      .filter((f) => /\.(tsx?|ts)$/.test(f) && /export (async function|const) action\b/.test(fs.readFileSync(path.join(routesDir, f), "utf8")))
      .filter((f) => !NOT_COURSE_WRITES.has(f) && f !== "api/feed-check.ts");
    expect(new Set(cases.map((x) => x[0]))).toEqual(new Set(withAction));

    const before = await snapshot();
    const students = new Set(["groups/submissions.tsx", "api/group-submissions.ts", "api/submission-preview.ts"]);
    for (const [module, handler, req, params] of cases) {
      for (const [who, cookie] of students.has(module) ? [["student", student], ["admin", admin]] : [["instructor", instructor], ["admin", admin]]) {
        const res = await call(handler, req(cookie), params);
        const where = `${module} ${who} ${req(cookie).method} ${JSON.stringify(params)}`;
        expect(statusOf(res), where).toBe(409);
        const body = res instanceof Response ? ((await res.json()) as { error: string }).error : payloadOf(res).message;
        expect(body, where).toBe(ARCHIVED_READ_ONLY);
      }
    }
    expect(await snapshot()).toEqual(before);
  });

  test("reads still work, a check that stores nothing too, and the course can come out of the archive", async () => {
    expect(statusOf(await call(courseLoader, request(`/courses/${p.course.id}`, { cookie: instructor }), { courseId: String(p.course.id) }))).toBe(200);
    expect(statusOf(await call(sessionLoader, request(`/sessions/${p.session.id}`, { cookie: student }), { sessionId: String(p.session.id) }))).toBe(200);
    const check = (await call(feedCheck, new Request("http://127.0.0.1:3100/api/feed-check", {
      method: "POST", headers: { Cookie: instructor, Origin: "http://127.0.0.1:3100", "Content-Type": "application/json" },
      body: JSON.stringify({ reactionSystemId: p.system.id, session: {}, benches: [] }),
    }))) as Response;
    expect(check.status).not.toBe(409);
    const back = await call(courseAction, request(`/courses/${p.course.id}`, { cookie: instructor, form: { intent: "unarchive" } }), { courseId: String(p.course.id) });
    expect(statusOf(back)).toBe(200);
    expect((await Course.findByPk(p.course.id))!.archivedAt).toBeNull();
    const upload = (await call(apiUpload, uploadRequest(`/api/groups/${p.groups[0].id}/submissions`, student, { bytes: CSV, name: "after.csv" }), { groupId: String(p.groups[0].id) })) as Response;
    expect(upload.status).toBe(202);
  });
});
