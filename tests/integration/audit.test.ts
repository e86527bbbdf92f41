// Every change of a role lands in the audit log with who, what, when, before and after.
import { describe, expect, test } from "vitest";
import { AuditEntry, CourseMembership, User } from "~/.server/db/models.server";
import { changeMembershipRole, changeUserRole } from "~/.server/people.server";
import { recordAudit } from "~/.server/audit.server";
import { sequelize } from "~/.server/db/models.server";

describe("audit log", () => {
  test("a course role change records actor, before and after", async () => {
    const instructor = (await User.findOne({ where: { email: "instructor@demo.ratebook.invalid" } }))!;
    const target = (await User.findOne({ where: { email: "student3@demo.ratebook.invalid" } }))!;
    const m = (await CourseMembership.findOne({ where: { userId: target.id, courseId: 1 } }))!;
    const result = await changeMembershipRole(instructor, 1, m.id, "demonstrator");
    expect(result.ok).toBe(true);
    const entry = await AuditEntry.findOne({ where: { entityType: "course_membership", entityId: String(m.id), action: "membership.role-changed" } });
    expect(entry).not.toBeNull();
    expect(entry!.actorId).toBe(instructor.id);
    expect(entry!.before).toEqual({ role: "student" });
    expect(entry!.after).toEqual({ role: "demonstrator" });
    expect(Date.now() - entry!.createdAt.getTime()).toBeLessThan(60_000);
  });

  test("an admin role change is audited; a refused change is not", async () => {
    const admin = (await User.findOne({ where: { email: "admin@demo.ratebook.invalid" } }))!;
    const target = (await User.findOne({ where: { email: "student4@demo.ratebook.invalid" } }))!;
    expect((await changeUserRole(admin, target.id, "course-creator")).ok).toBe(true);
    expect(await AuditEntry.count({ where: { action: "user.role-changed", entityId: String(target.id) } })).toBe(1);
    const refused = await changeUserRole(admin, target.id, "emperor");
    expect(refused.ok).toBe(false);
    const self = await changeUserRole(admin, admin.id, "member");
    expect(self).toMatchObject({ ok: false, errors: { role: expect.stringMatching(/own admin role/) } });
    expect(await AuditEntry.count({ where: { action: "user.role-changed", entityId: String(admin.id) } })).toBe(0);
  });

  test("the last instructor cannot demote themself", async () => {
    const instructor = (await User.findOne({ where: { email: "instructor@demo.ratebook.invalid" } }))!;
    const m = (await CourseMembership.findOne({ where: { userId: instructor.id, courseId: 1 } }))!;
    const res = await changeMembershipRole(instructor, 1, m.id, "student");
    expect(res).toMatchObject({ ok: false, errors: { role: expect.stringMatching(/at least one instructor/) } });
  });

  test("an audit entry written inside a failed transaction is rolled back with the change", async () => {
    const before = await AuditEntry.count();
    await expect(
      sequelize.transaction(async (transaction) => {
        await recordAudit({ actorId: null, action: "test.rollback", entityType: "test", entityId: 1, after: { x: 1 } }, transaction);
        throw new Error("change failed");
      }),
    ).rejects.toThrow("change failed");
    expect(await AuditEntry.count()).toBe(before);
  });
});
