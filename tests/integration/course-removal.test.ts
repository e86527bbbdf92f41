// A student taken off a course loses their group with it: the group membership ends in the same
// transaction (audited), and every group permission also needs current course membership, so a
// group row left behind grants nothing (issue 15).
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { loader as submissionApi } from "~/routes/api/submission";
import { loader as original } from "~/routes/api/submission-original";
import { action as courseAction } from "~/routes/courses/course";
import { action as sessionAction } from "~/routes/sessions/session";
import { Bench } from "~/.server/db/lab-sessions.server";
import { AuditEntry, CourseMembership } from "~/.server/db/models.server";
import { GroupMember } from "~/.server/db/groups.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call, request, signInAs } from "./helpers";
import { makePractical, uploadRequest, PASSWORD, type Practical } from "./practical-fixture";

let p: Practical;
const CSV = "t / s,CA (mol/L)\n0,0.0200\n60,0.0186\n120,0.0174\n180,0.0163\n240,0.0153\n";

beforeAll(async () => {
  p = await makePractical("RMV-T", { groups: 2 });
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

async function uploadAs(cookie: string, groupId: number) {
  return (await call(upload, uploadRequest(`/api/groups/${groupId}/submissions`, cookie, { bytes: CSV, name: "run.csv" }), { groupId: String(groupId) })) as Response;
}

describe("taken off the course", () => {
  test("removal ends the group membership (audited) and the group's work is closed to them", async () => {
    const student = p.students[0];
    const group = p.groups[0];
    const cookie = await signInAs(student.email, PASSWORD);
    const first = await uploadAs(cookie, group.id);
    expect(first.status).toBe(202);
    const { id } = (await first.json()) as { id: number };

    const membership = (await CourseMembership.findOne({ where: { courseId: p.course.id, userId: student.id } }))!;
    const instructorCookie = await signInAs(p.instructor.email, PASSWORD);
    const res = await call(courseAction, request(`/courses/${p.course.id}`, { cookie: instructorCookie, form: { intent: "remove-member", membershipId: String(membership.id) } }), { courseId: String(p.course.id) });
    expect(res instanceof Response ? res.status : 200).toBeLessThan(400);
    expect(await CourseMembership.findByPk(membership.id)).toBeNull();
    expect(await GroupMember.findOne({ where: { courseId: p.course.id, userId: student.id } })).toBeNull();
    const audit = await AuditEntry.findOne({ where: { action: "group.member-removed", entityId: String(group.id) } });
    expect(audit?.before).toMatchObject({ userId: student.id, reason: "taken off the course" });

    for (const [handler, path] of [[submissionApi, `/api/submissions/${id}`], [original, `/api/submissions/${id}/original`]] as const) {
      const r = (await call(handler, request(path, { cookie }), { submissionId: String(id) })) as Response;
      expect(r.status, path).toBe(403);
    }
    expect((await uploadAs(cookie, group.id)).status).toBe(403);
  });

  test("a group row left behind (data from before the fix) grants nothing without course membership", async () => {
    const student = p.students[1];
    const group = p.groups[1];
    const cookie = await signInAs(student.email, PASSWORD);
    // Only the course membership goes, as removal did before: the group row stays.
    await CourseMembership.destroy({ where: { courseId: p.course.id, userId: student.id } });
    expect(await GroupMember.findOne({ where: { groupId: group.id, userId: student.id } })).not.toBeNull();
    expect((await uploadAs(cookie, group.id)).status).toBe(403);
  });
});

describe("bench assignment form", () => {
  test("a malformed group id answers 400 and leaves every bench as it was", async () => {
    const cookie = await signInAs(p.instructor.email, PASSWORD);
    const before = (await Bench.findAll({ where: { sessionId: p.session.id }, order: [["id", "ASC"]] })).map((b) => [b.id, b.groupId]);
    const form: Record<string, string> = { intent: "assign" };
    for (const [id, groupId] of before) form[`bench-${id}`] = String(groupId ?? "");
    form[`bench-${before[0][0]}`] = "12abc";
    const res = await call(sessionAction, request(`/sessions/${p.session.id}`, { cookie, form }), { sessionId: String(p.session.id) });
    expect(res.init?.status).toBe(400);
    expect(res.data.message).toMatch(/not a group id/);
    const after = (await Bench.findAll({ where: { sessionId: p.session.id }, order: [["id", "ASC"]] })).map((b) => [b.id, b.groupId]);
    expect(after).toEqual(before);
  });
});
