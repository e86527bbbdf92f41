// People and courses: taking a person off a course (audited), archiving, course codes unique per
// term, permissions that follow the course role, the role shown to an admin who is not a member,
// a student's staff list, and what the audit log and sent-mail pages show.
import { describe, expect, test } from "vitest";
import { action as courseAction, loader as courseLoader } from "~/routes/courses/course";
import { action as newCourseAction } from "~/routes/courses/new";
import { loader as fitCheckLoader } from "~/routes/tools/fit-check";
import { loader as dashboardLoader } from "~/routes/dashboard";
import { loader as layoutLoader } from "~/routes/signed-in-layout";
import { loader as auditLoader } from "~/routes/admin/audit";
import { AuditEntry, Course, CourseMembership, User } from "~/.server/db/models.server";
import { hashPassword } from "~/.server/passwords.server";
import { auditChanges } from "~/lib/audit-text";
import { call, demoCookie, payloadOf, request, signInAs, statusOf } from "./helpers";

async function newCourse(code: string, term = "People test term") {
  const cookie = await demoCookie("instructor");
  const res = await call(newCourseAction, request("/courses/new", { cookie, form: { code, title: `${code} (test)`, term } }));
  expect(res.status).toBe(302);
  return { cookie, id: res.headers.get("Location")!.split("/").pop()! };
}

const post = (cookie: string, id: string, form: Record<string, string>) => call(courseAction, request(`/courses/${id}`, { cookie, form }), { courseId: id });

describe("people and courses", () => {
  test("an instructor takes a person off a course; the audit log has who, before and what", async () => {
    const { cookie, id } = await newCourse("PEOPLE-1");
    await post(cookie, id, { intent: "invite", email: "take-off@demo.ratebook.invalid", displayName: "Take Off (test)", role: "student" });
    const m = await CourseMembership.findOne({ where: { courseId: Number(id) }, include: [{ model: User, as: "user", where: { email: "take-off@demo.ratebook.invalid" } }] });
    const res = await post(cookie, id, { intent: "remove-member", membershipId: String(m!.id) });
    expect(statusOf(res)).toBe(200);
    expect(payloadOf(res).notice).toBe("Take Off (test) is no longer in this course.");
    expect(await CourseMembership.count({ where: { id: m!.id } })).toBe(0);
    const entry = await AuditEntry.findOne({ where: { action: "membership.removed", entityId: String(m!.id) } });
    expect(entry!.before).toMatchObject({ email: "take-off@demo.ratebook.invalid", role: "student" });
    // The last instructor stays.
    const mine = await CourseMembership.findOne({ where: { courseId: Number(id), role: "instructor" } });
    expect(payloadOf(await post(cookie, id, { intent: "remove-member", membershipId: String(mine!.id) })).errors.form).toMatch(/at least one instructor/);
  });

  test("an archived course is read-only, listed apart on the dashboard, and can come back", async () => {
    const { cookie, id } = await newCourse("PEOPLE-2");
    expect(statusOf(await post(cookie, id, { intent: "archive" }))).toBe(200);
    expect((await Course.findByPk(Number(id)))!.archivedAt).not.toBeNull();
    expect(await AuditEntry.count({ where: { action: "course.archived", entityId: id } })).toBe(1);
    const refused = await post(cookie, id, { intent: "invite", email: "late@demo.ratebook.invalid", displayName: "Late (test)", role: "student" });
    expect(statusOf(refused)).toBe(409);
    expect(payloadOf(refused).message).toMatch(/archived/);
    const dash = payloadOf(await call(dashboardLoader, request("/dashboard", { cookie })));
    expect(dash.courses.find((c: { id: number }) => String(c.id) === id).archived).toBe(true);
    expect(statusOf(await post(cookie, id, { intent: "unarchive" }))).toBe(200);
    expect((await Course.findByPk(Number(id)))!.archivedAt).toBeNull();
  });

  test("a course code is unique within a term, not forever", async () => {
    await newCourse("PEOPLE-3", "Autumn 2026");
    await newCourse("PEOPLE-3", "Spring 2027");
    const cookie = await demoCookie("instructor");
    const again = await call(newCourseAction, request("/courses/new", { cookie, form: { code: "PEOPLE-3", title: "Again", term: "Spring 2027" } }));
    expect(statusOf(again)).toBe(400);
    expect(payloadOf(again).errors.code).toBe("A course with the code PEOPLE-3 exists already in Spring 2027.");
  });

  test("a course demonstrator whose account is a member may open the data-set check; a student may not", async () => {
    const email = "course-demonstrator@demo.ratebook.invalid";
    const user = await User.create({ email, displayName: "Course demonstrator (test)", role: "member", passwordHash: await hashPassword("demonstrator-pass-1") });
    const cookie = await signInAs(email, "demonstrator-pass-1");
    expect(statusOf(await call(fitCheckLoader, request("/fit-check", { cookie })))).toBe(403);
    const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
    await CourseMembership.create({ courseId: course!.id, userId: user.id, role: "demonstrator" });
    expect(statusOf(await call(fitCheckLoader, request("/fit-check", { cookie })))).toBe(200);
    const nav = payloadOf(await call(layoutLoader, request("/dashboard", { cookie }))).nav.map((i: { to: string }) => i.to);
    expect(nav).toContain("/fit-check");
    const student = await demoCookie("student");
    expect(statusOf(await call(fitCheckLoader, request("/fit-check", { cookie: student })))).toBe(403);
  });

  test("account types do not read as course roles", async () => {
    const roles = (await User.findAll({ attributes: ["role"], group: ["role"] })).map((u) => u.role).sort();
    for (const r of roles) expect(["admin", "course-creator", "member"]).toContain(r);
    const layout = payloadOf(await call(layoutLoader, request("/dashboard", { cookie: await demoCookie("instructor") })));
    expect(layout.user.roleLabel).toBe("course creator");
  });

  test("an admin who is not on a course is not shown as its instructor", async () => {
    const admin = await demoCookie("admin");
    const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
    const page = payloadOf(await call(courseLoader, request(`/courses/${course!.id}`, { cookie: admin }), { courseId: String(course!.id) }));
    expect(page.myRole).toBeNull();
    expect(page.canManage).toBe(true);
    const dash = payloadOf(await call(dashboardLoader, request("/dashboard", { cookie: admin })));
    expect(dash.courses.find((c: { code: string }) => c.code === "KIN-DEMO").myRole).toBeNull();
  });

  test("a student's staff list has no students, the student included", async () => {
    const cookie = await demoCookie("student");
    const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
    const page = payloadOf(await call(courseLoader, request(`/courses/${course!.id}`, { cookie }), { courseId: String(course!.id) }));
    expect(page.members.length).toBeGreaterThan(0);
    expect(page.members.every((m: { role: string }) => m.role !== "student")).toBe(true);
    expect(page.members.every((m: { email: string | null }) => m.email === null)).toBe(true);
  });

  test("members are listed by name, so a row stays where it was when its role changes", async () => {
    const { cookie, id } = await newCourse("PEOPLE-4");
    for (const n of ["Ann", "Bob", "Cy"]) await post(cookie, id, { intent: "invite", email: `${n.toLowerCase()}-order@demo.ratebook.invalid`, displayName: `${n} Order (test)`, role: "student" });
    const before = payloadOf(await call(courseLoader, request(`/courses/${id}`, { cookie }), { courseId: id })).members;
    const bob = before.find((m: { name: string }) => m.name.startsWith("Bob"));
    await post(cookie, id, { intent: "change-role", membershipId: String(bob.id), role: "instructor" });
    const after = payloadOf(await call(courseLoader, request(`/courses/${id}`, { cookie }), { courseId: id })).members;
    expect(after.map((m: { id: number }) => m.id)).toEqual(before.map((m: { id: number }) => m.id));
    expect(after.find((m: { id: number }) => m.id === bob.id).role).toBe("instructor");
  });

  test("the audit log shows changes as readable before/after lines", async () => {
    expect(auditChanges({ role: "student" }, { role: "demonstrator" })).toEqual(["role: student → demonstrator"]);
    expect(auditChanges(null, { code: "X", title: "T" })).toEqual(["code: X", "title: T"]);
    expect(auditChanges({ archived: false }, { archived: true })).toEqual(["archived: no → yes"]);
    const rows = payloadOf(await call(auditLoader, request("/admin/audit", { cookie: await demoCookie("admin") }))).rows;
    const text = JSON.stringify(rows.map((r: { changes: string[] }) => r.changes));
    expect(text).toContain(" → ");
    expect(text).not.toMatch(/\{\\?"role/);
  });
});
