// A roster import cannot rename or enrol somebody who already has an account (the admin
// included): they keep their name, get an invitation, and join only when they accept it on their
// dashboard (issue 15). New people still get an account and an invitation e-mail as before.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as rosterAction } from "~/routes/courses/roster";
import { action as dashboardAction, loader as dashboardLoader } from "~/routes/dashboard";
import { AuditEntry, CourseMembership, User } from "~/.server/db/models.server";
import { Group, GroupMember } from "~/.server/db/groups.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { hashPassword } from "~/.server/passwords.server";
import { call, payloadOf, request, signInAs, statusOf, waitForMail } from "./helpers";
import { makePractical, PASSWORD, type Practical } from "./practical-fixture";

let p: Practical;
let instructorCookie: string;
let admin: User;
let person: User;

beforeAll(async () => {
  p = await makePractical("RIMP-T", { groups: 1 });
  instructorCookie = await signInAs(p.instructor.email, PASSWORD);
  const hash = await hashPassword(PASSWORD);
  admin = await User.create({ email: "rimp-admin@test.ratebook.invalid", displayName: "Admin Of Rimp (invented)", role: "admin", passwordHash: hash });
  person = await User.create({ email: "rimp-person@test.ratebook.invalid", displayName: "Own Name (invented)", role: "member", passwordHash: hash });
});
afterAll(async () => {
  await p.course.destroy();
  await User.destroy({ where: { id: [admin.id, person.id] } });
  await User.destroy({ where: { email: "rimp-new@test.ratebook.invalid" } });
  await closeSequelize();
});

const params = () => ({ courseId: String(p.course.id) });

function upload(csv: string) {
  const form = new FormData();
  form.append("roster", new File([csv], "class.csv", { type: "text/csv" }));
  return new Request(`http://127.0.0.1/courses/${p.course.id}/roster`, { method: "POST", headers: { Cookie: instructorCookie }, body: form });
}

async function importCsv(csv: string) {
  const preview = payloadOf(await call(rosterAction, upload(csv), params()));
  expect(preview.kind).toBe("preview");
  const saved = await call(rosterAction, request(`/courses/${p.course.id}/roster`, { cookie: instructorCookie, form: { intent: "confirm", rows: preview.payload } }), params());
  return { preview, saved: payloadOf(saved) };
}

describe("roster import and existing accounts", () => {
  test("existing people (the admin too) keep their names and are invited, not enrolled; they join when they accept", async () => {
    const csv = [
      "Student ID,Name,E-mail,Group",
      `R9001,Renamed Admin (invented),${admin.email},Lab Z`,
      `R9002,Renamed Person (invented),${person.email},Lab Z`,
      "R9003,New Person (invented),rimp-new@test.ratebook.invalid,Lab Z",
    ].join("\n");
    const { preview, saved } = await importCsv(csv);
    const notes = preview.rows.map((r: { notes: string[] }) => r.notes.join("; "));
    expect(notes[0]).toMatch(/invited to join/);
    expect(notes[0]).toContain("keeps the account's name Admin Of Rimp (invented)");
    expect(saved.kind).toBe("saved");
    expect(saved.message).toContain("1 added");
    expect(saved.message).toContain("2 person(s) with an account invited");

    // names untouched, no membership, no group
    for (const [u, name] of [[admin, "Admin Of Rimp (invented)"], [person, "Own Name (invented)"]] as const) {
      const fresh = (await User.findByPk(u.id))!;
      expect(fresh.displayName).toBe(name);
      expect(fresh.role).toBe(u.role);
      expect(await CourseMembership.count({ where: { courseId: p.course.id, userId: u.id } })).toBe(0);
      expect(await GroupMember.count({ where: { courseId: p.course.id, userId: u.id } })).toBe(0);
    }
    // the new person is enrolled as before
    const fresh = (await User.findOne({ where: { email: "rimp-new@test.ratebook.invalid" } }))!;
    expect(fresh.displayName).toBe("New Person (invented)");
    expect(await CourseMembership.count({ where: { courseId: p.course.id, userId: fresh.id } })).toBe(1);

    // the invitation mail uses the person's own name and sends them to the dashboard
    const [mail] = await waitForMail(person.email);
    expect(mail.subject).toContain("RIMP-T");
    expect(mail.text).toContain("Hello Own Name (invented)");
    expect(mail.text).toContain("/dashboard");
    expect(mail.text).not.toContain("Renamed");

    // the admin declines; the person accepts and gets the roster's student ID and group
    const adminCookie = await signInAs(admin.email, PASSWORD);
    const adminInv = payloadOf(await call(dashboardLoader, request("/dashboard", { cookie: adminCookie }))).invitations;
    expect(adminInv.map((i: { courseCode: string }) => i.courseCode)).toEqual(["RIMP-T"]);
    const declined = await call(dashboardAction, request("/dashboard", { cookie: adminCookie, form: { intent: "decline-invitation", invitationId: String(adminInv[0].id) } }));
    expect(payloadOf(declined), JSON.stringify(declined)).toMatchObject({ ok: true });
    expect(await CourseMembership.count({ where: { courseId: p.course.id, userId: admin.id } })).toBe(0);

    const cookie = await signInAs(person.email, PASSWORD);
    const inv = payloadOf(await call(dashboardLoader, request("/dashboard", { cookie }))).invitations;
    expect(inv).toHaveLength(1);
    // somebody else cannot answer it
    const foreign = await call(dashboardAction, request("/dashboard", { cookie: adminCookie, form: { intent: "accept-invitation", invitationId: String(inv[0].id) } }));
    expect(statusOf(foreign)).toBe(404);
    const accepted = await call(dashboardAction, request("/dashboard", { cookie, form: { intent: "accept-invitation", invitationId: String(inv[0].id) } }));
    expect(payloadOf(accepted)).toMatchObject({ ok: true });
    const m = (await CourseMembership.findOne({ where: { courseId: p.course.id, userId: person.id } }))!;
    expect(m.role).toBe("student");
    expect(m.studentNumber).toBe("R9002");
    const labZ = (await Group.findOne({ where: { courseId: p.course.id, name: "Lab Z" } }))!;
    expect(await GroupMember.count({ where: { groupId: labZ.id, userId: person.id } })).toBe(1);
    expect((await User.findByPk(person.id))!.displayName).toBe("Own Name (invented)");
    expect(await AuditEntry.count({ where: { action: "membership.added", entityId: String(m.id) } })).toBe(1);
  });

  test("a member's name is not changed by a later roster either", async () => {
    const student = p.students[0];
    const before = (await User.findByPk(student.id))!.displayName;
    const { saved } = await importCsv(["Student ID,Name,E-mail", `R9100,Someone Else (invented),${student.email}`].join("\n"));
    expect(saved.kind).toBe("saved");
    expect((await User.findByPk(student.id))!.displayName).toBe(before);
    expect((await CourseMembership.findOne({ where: { courseId: p.course.id, userId: student.id } }))!.studentNumber).toBe("R9100");
  });
});
