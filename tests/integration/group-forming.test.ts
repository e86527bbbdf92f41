// Forming groups (issue 18): by name in natural order, in roster order, or shuffled with a seed
// that forms the same groups again; a bad seed is refused beside its field and nothing is formed.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { Op } from "sequelize";
import { action as groupsAction } from "~/routes/courses/groups";
import { AuditEntry, Course, CourseMembership, User } from "~/.server/db/models.server";
import { Group, GroupMember } from "~/.server/db/groups.server";
import { hashPassword } from "~/.server/passwords.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call, payloadOf, request, signInAs, statusOf } from "./helpers";

const PASSWORD = "forming-pass-123";
const courses: Course[] = [];
let instructor: User;
// roster order (the order they joined) is deliberately not name order
const NAMES = ["Student 10", "Student 2", "Student 7", "Student 1", "Student 5", "Student 3"];

async function courseWithStudents(code: string) {
  const course = await Course.create({ code, title: `Forming ${code} (invented)`, term: "" });
  courses.push(course);
  await CourseMembership.create({ courseId: course.id, userId: instructor.id, role: "instructor" });
  for (const [i, name] of NAMES.entries()) {
    const u = await User.create({ email: `${code.toLowerCase()}-${i}@test.ratebook.invalid`, displayName: name, role: "member", passwordHash: null });
    await CourseMembership.create({ courseId: course.id, userId: u.id, role: "student" });
  }
  return course;
}

async function form(course: Course, fields: Record<string, string>) {
  const cookie = await signInAs(instructor.email, PASSWORD);
  return call(groupsAction, request(`/courses/${course.id}/groups`, { cookie, form: { intent: "form", ...fields } }), { courseId: String(course.id) });
}

async function groupsOf(course: Course): Promise<string[][]> {
  const groups = await Group.findAll({ where: { courseId: course.id }, include: [{ model: GroupMember, as: "members", include: [{ model: User, as: "user" }] }], order: [["id", "ASC"]] });
  return groups.map((g) => (g.members ?? []).sort((a, b) => a.id - b.id).map((m) => m.user!.displayName));
}

beforeAll(async () => {
  instructor = await User.create({ email: "forming-instructor@test.ratebook.invalid", displayName: "Instructor Forming", role: "course-creator", passwordHash: await hashPassword(PASSWORD) });
});
afterAll(async () => {
  for (const c of courses) await c.destroy();
  await User.destroy({ where: { email: { [Op.or]: [{ [Op.like]: "form-%@test.ratebook.invalid" }, { [Op.like]: "forming-%@test.ratebook.invalid" }] } } });
  await closeSequelize();
});

describe("forming groups", () => {
  test("by name: natural order, Student 2 before Student 10", async () => {
    const c = await courseWithStudents("FORM-NAME");
    expect(statusOf(await form(c, { size: "2", order: "name" }))).toBe(200);
    expect(await groupsOf(c)).toEqual([["Student 1", "Student 2"], ["Student 3", "Student 5"], ["Student 7", "Student 10"]]);
  });

  test("in roster order: the order people joined the course", async () => {
    const c = await courseWithStudents("FORM-ROSTER");
    expect(statusOf(await form(c, { size: "3", order: "roster" }))).toBe(200);
    expect(await groupsOf(c)).toEqual([["Student 10", "Student 2", "Student 7"], ["Student 1", "Student 5", "Student 3"]]);
  });

  test("shuffled: the same seed forms the same groups in another course; the seed is in the message and the audit", async () => {
    const a = await courseWithStudents("FORM-SHUF-A");
    const b = await courseWithStudents("FORM-SHUF-B");
    const r = await form(a, { size: "2", order: "shuffled", seed: "4711" });
    expect(payloadOf(r).message).toMatch(/seed 4711/);
    await form(b, { size: "2", order: "shuffled", seed: "4711" });
    const ga = await groupsOf(a);
    expect(await groupsOf(b)).toEqual(ga);
    expect(ga.flat().sort()).toEqual([...NAMES].sort());
    const audit = await AuditEntry.findOne({ where: { action: "group.formed", entityId: String(a.id) } });
    expect(audit?.after).toMatchObject({ order: "shuffled", seed: 4711 });
  });

  test("a shuffle without a usable seed is refused beside the seed field; nothing formed", async () => {
    const c = await courseWithStudents("FORM-BAD");
    const r = await form(c, { size: "2", order: "shuffled", seed: "12abc" });
    expect(statusOf(r)).toBe(400);
    expect(payloadOf(r)).toMatchObject({ field: "seed" });
    expect(await Group.count({ where: { courseId: c.id } })).toBe(0);
  });
});
