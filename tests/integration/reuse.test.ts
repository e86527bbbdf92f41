// Reuse (issue 18): a practical copied to another course keeps its benches, set-up and rubric
// with its dates moved and no groups; a course copied to a new term keeps staff, reaction systems
// and practicals but no students, groups, uploads or marks; the bench assignment downloads agree
// with the textbook dilution C1·V1 = C2·V2 and with each other.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import ExcelJS from "exceljs";
import Papa from "papaparse";
import { action as copyPracticalAction, loader as copyPracticalPage } from "~/routes/sessions/copy";
import { action as copyCourseAction } from "~/routes/courses/copy";
import { loader as benchesXlsx } from "~/routes/sessions/benches-xlsx";
import { loader as benchesCsv } from "~/routes/sessions/benches-csv";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { AuditEntry, Course, CourseMembership, User } from "~/.server/db/models.server";
import { Group, GroupMember } from "~/.server/db/groups.server";
import { Submission } from "~/.server/db/submissions.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { daysBetween, moveDay } from "~/.server/planning/reuse.server";
import { call, payloadOf, request, signInAs, statusOf } from "./helpers";
import { makePractical, PASSWORD, uploadRequest, type Practical } from "./practical-fixture";
import { action as upload } from "~/routes/api/group-submissions";

let p: Practical;
let target: Course;
const made: Course[] = [];

beforeAll(async () => {
  p = await makePractical("REUSE-T", { groups: 3, deadline: new Date("2026-03-10T17:00:00Z") });
  await p.session.update({ date: "2026-03-03" });
  target = await Course.create({ code: "REUSE-NEXT", title: "Next term's course (invented)", term: "Autumn 2027" });
  await CourseMembership.create({ courseId: target.id, userId: p.instructor.id, role: "instructor" });
  made.push(target);
  // an upload in the source practical: the copies must not carry it
  const cookie = await signInAs(p.students[0].email, PASSWORD);
  const res = (await call(upload, uploadRequest(`/api/groups/${p.groups[0].id}/submissions`, cookie, { bytes: "t / s,CA (mol/L)\n0,0.0200\n60,0.0186\n120,0.0174\n180,0.0163\n240,0.0153\n", name: "run.csv" }), { groupId: String(p.groups[0].id) })) as Response;
  expect(res.status).toBe(202);
});
afterAll(async () => {
  for (const c of made) await c.destroy();
  await p.course.destroy();
  await closeSequelize();
});

describe("days", () => {
  test("moving a lab day is whole UTC days (common practice, no source)", () => {
    expect(daysBetween("2026-03-03", "2027-03-02")).toBe(364);
    expect(moveDay("2026-03-03", 364)).toBe("2027-03-02");
    // across the spring clock change in zones that have one: still whole days
    expect(moveDay("2026-03-28", 2)).toBe("2026-03-30");
  });
});

describe("copy a practical", () => {
  test("to another course: benches, set-up, rubric and reaction system kept, dates moved, no groups, no uploads; audited", async () => {
    const cookie = await signInAs(p.instructor.email, PASSWORD);
    const page = payloadOf(await call(copyPracticalPage, request(`/sessions/${p.session.id}/copy`, { cookie }), { sessionId: String(p.session.id) }));
    expect(page.targets.map((t: { id: number }) => t.id)).toEqual(expect.arrayContaining([p.course.id, target.id]));

    const res = await call(copyPracticalAction, request(`/sessions/${p.session.id}/copy`, { cookie, form: { courseId: String(target.id), date: "2027-03-02", title: "Practical again" } }), { sessionId: String(p.session.id) });
    expect(res instanceof Response && res.status).toBe(302);
    const id = Number(/\/sessions\/(\d+)/.exec((res as Response).headers.get("Location")!)![1]);
    const copy = (await LabSession.findByPk(id))!;
    expect(copy.courseId).toBe(target.id);
    expect(copy.title).toBe("Practical again");
    expect(copy.date).toBe("2027-03-02");
    // the deadline keeps its 7 days and 17:00 after the lab day
    expect(copy.deadline?.toISOString()).toBe("2027-03-09T17:00:00.000Z");
    expect(copy.status).toBe("planned");
    expect(copy.notifiedAt).toBeNull();
    expect(copy.rubric).toEqual(p.session.rubric);
    for (const k of ["slotMinutes", "setupMinutes", "reactorVolumeMl", "stockAMolL", "stockBMolL", "samplingIntervalS", "targetConversion", "gradeWeight"] as const) expect(copy[k], k).toEqual(p.session[k]);

    const benches = await Bench.findAll({ where: { sessionId: id }, order: [["position", "ASC"]] });
    expect(benches.map((b) => [b.position, b.label, b.CA0, b.CB0, b.temperatureC])).toEqual(p.benches.map((b) => [b.position, b.label, b.CA0, b.CB0, b.temperatureC]));
    expect(benches.every((b) => b.groupId === null)).toBe(true);
    expect(await Submission.count({ where: { sessionId: id } })).toBe(0);

    // the target course gets its own reaction system with the same chemistry (the source's stays)
    const rs = (await ReactionSystem.findByPk(copy.reactionSystemId))!;
    expect(rs.courseId).toBe(target.id);
    expect([rs.name, rs.kRef, rs.TrefC, rs.EaKJ, rs.measured]).toEqual([p.system.name, p.system.kRef, p.system.TrefC, p.system.EaKJ, p.system.measured]);
    const audit = await AuditEntry.findOne({ where: { action: "session.copied", entityId: String(id) } });
    expect(audit?.before).toMatchObject({ sessionId: p.session.id });

    // a second copy into the same course reuses that reaction system rather than making another
    const again = (await call(copyPracticalAction, request(`/sessions/${p.session.id}/copy`, { cookie, form: { courseId: String(target.id), date: "2027-04-06", title: "Practical a third time" } }), { sessionId: String(p.session.id) })) as Response;
    const id2 = Number(/\/sessions\/(\d+)/.exec(again.headers.get("Location")!)![1]);
    expect((await LabSession.findByPk(id2))!.reactionSystemId).toBe(copy.reactionSystemId);
  });

  test("refuses a course the person does not teach, an impossible day and an empty title, beside each field; nothing made", async () => {
    const other = await Course.create({ code: "REUSE-OTHER", title: "Not theirs (invented)", term: "" });
    made.push(other);
    const cookie = await signInAs(p.instructor.email, PASSWORD);
    const before = await LabSession.count();
    const res = await call(copyPracticalAction, request(`/sessions/${p.session.id}/copy`, { cookie, form: { courseId: String(other.id), date: "2027-02-31", title: " " } }), { sessionId: String(p.session.id) });
    expect(statusOf(res)).toBe(400);
    const { errors } = payloadOf(res);
    expect(errors.courseId).toMatch(/course you teach/);
    expect(errors.date).toMatch(/no such day/);
    expect(errors.title).toMatch(/title/);
    expect(await LabSession.count()).toBe(before);
  });

  test("students and demonstrators cannot copy", async () => {
    const cookie = await signInAs(p.students[1].email, PASSWORD);
    const res = await call(copyPracticalAction, request(`/sessions/${p.session.id}/copy`, { cookie, form: { courseId: String(p.course.id), date: "2027-03-02", title: "x" } }), { sessionId: String(p.session.id) });
    expect(statusOf(res)).toBe(403);
  });
});

describe("copy a course to a new term", () => {
  test("staff, reaction systems and practicals come along with dates moved; students, groups and uploads stay", async () => {
    const demonstrator = await User.create({ email: "reuse-demo@test.ratebook.invalid", displayName: "Demonstrator REUSE", role: "member", passwordHash: null });
    await CourseMembership.create({ courseId: p.course.id, userId: demonstrator.id, role: "demonstrator" });
    const cookie = await signInAs(p.instructor.email, PASSWORD);
    const res = await call(copyCourseAction, request(`/courses/${p.course.id}/copy`, { cookie, form: { term: "Spring 2027", title: "", firstDate: "2027-03-09" } }), { courseId: String(p.course.id) });
    expect(res instanceof Response && res.status).toBe(302);
    const id = Number(/\/courses\/(\d+)/.exec((res as Response).headers.get("Location")!)![1]);
    const copy = (await Course.findByPk(id))!;
    made.push(copy);
    expect([copy.code, copy.term, copy.title]).toEqual([p.course.code, "Spring 2027", p.course.title]);
    const members = await CourseMembership.findAll({ where: { courseId: id } });
    expect(members.map((m) => [m.userId, m.role]).sort()).toEqual([[demonstrator.id, "demonstrator"], [p.instructor.id, "instructor"]].sort());
    expect(await Group.count({ where: { courseId: id } })).toBe(0);
    expect(await GroupMember.count({ where: { courseId: id } })).toBe(0);
    const practicals = await LabSession.findAll({ where: { courseId: id } });
    expect(practicals).toHaveLength(1);
    expect(practicals[0].date).toBe("2027-03-09");
    expect(practicals[0].deadline?.toISOString()).toBe("2027-03-16T17:00:00.000Z");
    expect(await Bench.count({ where: { sessionId: practicals[0].id } })).toBe(p.benches.length);
    expect(await Submission.count({ where: { sessionId: practicals[0].id } })).toBe(0);
    expect((await ReactionSystem.findByPk(practicals[0].reactionSystemId))!.courseId).toBe(id);
    expect(await AuditEntry.findOne({ where: { action: "course.copied", entityId: String(id) } })).not.toBeNull();

    // the same term twice is the code clash the new-course form names
    const twice = await call(copyCourseAction, request(`/courses/${p.course.id}/copy`, { cookie, form: { term: "Spring 2027", title: "", firstDate: "2027-03-09" } }), { courseId: String(p.course.id) });
    expect(statusOf(twice)).toBe(400);
    expect(payloadOf(twice).errors.code).toMatch(/exists already in Spring 2027/);
  });
});

describe("bench assignment downloads", () => {
  test("xlsx and CSV list every bench with group, members, feed and the stock volumes of C1·V1 = C2·V2", async () => {
    const cookie = await signInAs(p.instructor.email, PASSWORD);
    const params = { sessionId: String(p.session.id) };
    const xlsx = (await call(benchesXlsx, request(`/sessions/${p.session.id}/benches.xlsx`, { cookie }), params)) as Response;
    expect(xlsx.status).toBe(200);
    expect(xlsx.headers.get("Content-Disposition")).toMatch(/benches/);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(await xlsx.arrayBuffer());
    const ws = wb.getWorksheet("Benches")!;
    const header = (ws.getRow(1).values as unknown[]).slice(1, 11);
    expect(header).toEqual(["Bench", "Group", "Members", "CA0 (ester X (invented)) (mol/L)", "CB0 (hydroxide) (mol/L)", "M = CB0/(ν·CA0)", "Temperature (°C)", "Stock of ester X (invented) (mL)", "Stock of hydroxide (mL)", "Water (mL)"]);
    const csv = (await call(benchesCsv, request(`/sessions/${p.session.id}/benches.csv`, { cookie }), params)) as Response;
    const rows = Papa.parse<string[]>((await csv.text()).replace(/^\uFEFF/, ""), { skipEmptyLines: true }).data;
    expect(rows[0]).toEqual(header);
    p.benches.forEach((b, i) => {
      const cells = (ws.getRow(i + 2).values as unknown[]).slice(1);
      // textbook dilution: V1 = C2·V2 / C1 with V2 = 250 mL and stocks of 0.1 mol/L (the fixture's)
      const vA = (b.CA0 * 250) / 0.1;
      const vB = (b.CB0 * 250) / 0.1;
      expect(cells[0]).toBe(b.label);
      expect(cells[1]).toBe(p.groups[i].name);
      expect(cells[2]).toBe(p.students[i].displayName);
      expect(cells[5] as number).toBeCloseTo(b.CB0 / b.CA0, 10); // ν = 1 here
      expect(cells[7] as number).toBeCloseTo(vA, 9);
      expect(cells[8] as number).toBeCloseTo(vB, 9);
      expect(cells[9] as number).toBeCloseTo(250 - vA - vB, 9);
      expect(Number(rows[i + 1][7])).toBeCloseTo(vA, 9);
      expect(rows[i + 1][2]).toBe(p.students[i].displayName);
    });
  });

  test("students get 403, signed-out 401 JSON", async () => {
    const cookie = await signInAs(p.students[0].email, PASSWORD);
    const r = (await call(benchesCsv, request(`/sessions/${p.session.id}/benches.csv`, { cookie }), { sessionId: String(p.session.id) })) as Response;
    expect(r.status).toBe(403);
    const out = (await call(benchesCsv, request(`/sessions/${p.session.id}/benches.csv`), { sessionId: String(p.session.id) })) as Response;
    expect(out.status).toBe(401);
  });
});
