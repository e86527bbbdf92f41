// The gradebook pages' loaders and the course page's settings form, and the route that remembers
// each person's view of a table, against the real database (an invented course made here).
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { loader as sessionPage } from "~/routes/sessions/gradebook";
import { loader as coursePage, action as courseSettings } from "~/routes/courses/gradebook";
import { action as saveView, loader as readView } from "~/routes/api/table-view";
import { AuditEntry, Course, CourseMembership, User } from "~/.server/db/models.server";
import { LabSession } from "~/.server/db/lab-sessions.server";
import { Submission } from "~/.server/db/submissions.server";
import { createApiToken } from "~/.server/api-tokens.server";
import { hashPassword } from "~/.server/passwords.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call, payloadOf, request, statusOf } from "./helpers";
import { makePractical, PASSWORD, type Practical } from "./practical-fixture";

const BASE = "http://127.0.0.1:3100";
let p: Practical;
let staff: string;
let demonstrator: User;
let demoCookie: string;

beforeAll(async () => {
  p = await makePractical("GB-PAGE", { groups: 3 });
  staff = await p.cookie(p.instructor);
  demonstrator = await User.create({ email: "gb-page-demo@test.ratebook.invalid", displayName: "Demonstrator GB-PAGE", role: "member", passwordHash: await hashPassword(PASSWORD) });
  await CourseMembership.create({ courseId: p.course.id, userId: demonstrator.id, role: "demonstrator" });
  demoCookie = await p.cookie(demonstrator);
  const base = { sessionId: p.session.id, submittedAt: new Date(), status: "marked", measured: "concentrationA", timeUnit: "min", concentrationUnit: "mol/L", readings: null, reportedK: null, reportedMethod: null, timeColumn: null, valueColumn: null, submittedById: null };
  // G1 marked 80; G2 marked 55 and late; G3 uploaded nothing.
  await Submission.create({ ...base, groupId: p.groups[0].id, benchId: p.benches[0].id, version: 1, autoMark: 80 } as never);
  await Submission.create({ ...base, groupId: p.groups[1].id, benchId: p.benches[1].id, version: 1, autoMark: 55, late: true, latePenalty: 5 } as never);
});

afterAll(async () => {
  await p.course.destroy();
  await User.destroy({ where: { id: demonstrator.id } });
  await closeSequelize();
});

const openSession = (cookie: string, id = p.session.id) => call(sessionPage, request(`/sessions/${id}/gradebook`, { cookie }), { sessionId: String(id) });
const openCourse = (cookie: string, id = p.course.id) => call(coursePage, request(`/courses/${id}/gradebook`, { cookie }), { courseId: String(id) });
const postSettings = (cookie: string, form: Record<string, string>) =>
  call(courseSettings, request(`/courses/${p.course.id}/gradebook`, { cookie, form }), { courseId: String(p.course.id) });

function viewRequest(key: string, body: string, headers: Record<string, string>) {
  return new Request(`${BASE}/api/table-views/${key}`, { method: "POST", body, headers: { "Content-Type": "application/json", ...headers } });
}
const postView = (key: string, body: unknown, headers: Record<string, string>) =>
  call(saveView, viewRequest(key, typeof body === "string" ? body : JSON.stringify(body), headers), { tableKey: key }) as Promise<Response>;

describe("practical gradebook page", () => {
  test("staff get a row per group with the missing upload as missing, and an empty view at first", async () => {
    const page = await openSession(staff);
    expect(statusOf(page)).toBe(200);
    const { rows, kUnit, view } = payloadOf(page);
    // first order in A and in B: second order overall, so k is in L/(mol·s)
    expect(kUnit).toBe("L/(mol·s)");
    expect(rows.map((r: any) => [r.group, r.mark, r.status, r.late])).toEqual([["G1", 80, "marked", false], ["G2", 55, "marked", true], ["G3", null, null, false]]);
    expect(view).toEqual({ hidden: [], sort: [], filters: [], search: "" });
    expect(statusOf(await openSession(demoCookie))).toBe(200);
  });

  test("students are refused (403), an unknown practical is 404, signed out goes to sign-in", async () => {
    const student = await p.cookie(p.students[0]);
    expect(statusOf(await openSession(student))).toBe(403);
    expect(statusOf(await openSession(staff, 99999999))).toBe(404);
    const out = await call(sessionPage, request(`/sessions/${p.session.id}/gradebook`), { sessionId: String(p.session.id) });
    expect(statusOf(out)).toBe(302);
  });
});

describe("remembered view of a table", () => {
  test("a saved view comes back in the page's loader and from GET", async () => {
    const view = { hidden: ["members", "CB0"], sort: [{ id: "mark", desc: true }], filters: [{ id: "mark", value: "> 60" }], search: "G" };
    const res = await postView("session-gradebook", view, { Cookie: staff, Origin: BASE });
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ view });
    expect(payloadOf(await openSession(staff)).view).toEqual(view);
    // per person: the demonstrator's view is still the empty one
    expect(payloadOf(await openSession(demoCookie)).view).toEqual({ hidden: [], sort: [], filters: [], search: "" });
    const got: Response = await call(readView, request("/api/table-views/session-gradebook", { cookie: staff }), { tableKey: "session-gradebook" });
    expect(await got.json()).toEqual({ view });
  });

  test("a bad body is a 400 naming each problem; nothing stored changes", async () => {
    const before = payloadOf(await openSession(staff)).view;
    const res = await postView("session-gradebook", { hidden: "members", sort: [{ id: "mark", desc: "yes" }], colour: "red" }, { Cookie: staff, Origin: BASE });
    expect(res.status).toBe(400);
    const { errors } = await res.json();
    const paths = errors.map((e: any) => e.path).sort();
    expect(paths).toEqual(["", "hidden", "sort.0.desc"]);
    expect(errors.find((e: any) => e.path === "").message).toContain("colour");
    const notJson = await postView("session-gradebook", "{hidden:", { Cookie: staff, Origin: BASE });
    expect(notJson.status).toBe(400);
    expect((await notJson.json()).errors[0].message).toMatch(/not valid JSON/);
    expect(payloadOf(await openSession(staff)).view).toEqual(before);
  });

  test("an unknown table is 404; a cookie write from another site is 403; a token needs no Origin; signed out 401", async () => {
    const unknown = await postView("marks-table", { hidden: [] }, { Cookie: staff, Origin: BASE });
    expect(unknown.status).toBe(404);
    expect((await unknown.json()).error).toContain("session-gradebook");
    const foreign = await postView("course-gradebook", { hidden: [] }, { Cookie: staff, Origin: "https://elsewhere.invalid" });
    expect(foreign.status).toBe(403);
    const token = await createApiToken(p.instructor, "view test", 1);
    const byToken = await postView("course-gradebook", { hidden: ["group"] }, { Authorization: `Bearer ${token.token}` });
    expect(byToken.status).toBe(200);
    expect(await byToken.json()).toEqual({ view: { hidden: ["group"], sort: [], filters: [], search: "" } });
    expect(payloadOf(await openCourse(staff)).view.hidden).toEqual(["group"]);
    expect((await postView("course-gradebook", { hidden: [] }, {})).status).toBe(401);
  });
});

describe("course gradebook page and its settings", () => {
  test("instructors may change the settings, demonstrators read; students are refused", async () => {
    const page = payloadOf(await openCourse(staff));
    expect(page.canEdit).toBe(true);
    expect(page.rows.map((r: any) => [r.name, r.marks[p.session.id]])).toEqual([["Student 1 GB-PAGE", 80], ["Student 2 GB-PAGE", 55], ["Student 3 GB-PAGE", null]]);
    // the page carries no e-mail addresses
    expect(JSON.stringify(page.rows)).not.toContain("@");
    expect(payloadOf(await openCourse(demoCookie)).canEdit).toBe(false);
    expect(statusOf(await postSettings(demoCookie, { [`weight-${p.session.id}`]: "2" }))).toBe(403);
    expect(statusOf(await openCourse(await p.cookie(p.students[1])))).toBe(403);
  });

  test("a bad weight answers with its message beside the field and saves nothing", async () => {
    const field = `weight-${p.session.id}`;
    for (const [typed, message] of [
      ["heavy", "Give a weight: a number from 0 to 1000 (a point for decimals)."],
      ["", "Give a weight: a number from 0 to 1000 (a point for decimals)."],
      ["-1", "A weight cannot be below 0 (0 leaves the practical out of the total)."],
      ["1200", "A weight is at most 1000."],
    ]) {
      const res = await postSettings(staff, { intent: "settings", [field]: typed, missingCountsAsZero: "on" });
      expect(statusOf(res), typed).toBe(400);
      const { result } = payloadOf(res);
      expect(result.error[field], typed).toEqual([message]);
      // what was typed comes back for the form to show (Conform leaves out an empty field)
      if (typed) expect(result.initialValue[field]).toBe(typed);
    }
    const session = await LabSession.findByPk(p.session.id);
    expect(session!.gradeWeight).toBe(1);
    expect((await Course.findByPk(p.course.id))!.missingCountsAsZero).toBe(false);
  });

  test("a good form saves the weight and the rule, audited, and the page shows them", async () => {
    const field = `weight-${p.session.id}`;
    const res = await postSettings(staff, { intent: "settings", [field]: "2.5", missingCountsAsZero: "on" });
    expect(statusOf(res)).toBe(200);
    expect(payloadOf(res).saved).toBe(true);
    const page = payloadOf(await openCourse(staff));
    expect(page.sessions.find((s: any) => s.id === p.session.id).weight).toBe(2.5);
    expect(page.course.missingCountsAsZero).toBe(true);
    const audit = await AuditEntry.findOne({ where: { action: "gradebook.settings", entityId: String(p.course.id) }, order: [["id", "DESC"]] });
    expect(audit?.actorId).toBe(p.instructor.id);
    expect(audit?.before).toMatchObject({ missingCountsAsZero: false, weights: { [p.session.id]: 1 } });
    expect(audit?.after).toMatchObject({ missingCountsAsZero: true, weights: { [p.session.id]: 2.5 } });
    // Unticking the box turns the rule off again.
    await postSettings(staff, { intent: "settings", [field]: "2.5" });
    expect((await Course.findByPk(p.course.id))!.missingCountsAsZero).toBe(false);
  });

  test("an archived course's settings are read-only", async () => {
    await Course.update({ archivedAt: new Date() }, { where: { id: p.course.id } });
    try {
      expect(payloadOf(await openCourse(staff)).canEdit).toBe(false);
      const res = await postSettings(staff, { intent: "settings", [`weight-${p.session.id}`]: "3" });
      // archived means read-only in the policy (guards.server.ts refuseWriteIfArchived): 409 with the reason
      expect(statusOf(res)).toBe(409);
      expect(payloadOf(res).message).toContain("archived");
      expect((await LabSession.findByPk(p.session.id))!.gradeWeight).toBe(2.5);
    } finally {
      await Course.update({ archivedAt: null }, { where: { id: p.course.id } });
    }
  });
});
