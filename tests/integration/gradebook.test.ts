// Gradebooks against the real database: a small invented course with two practicals, one group's
// upload marked by the real job, the other versions stored as marked; every figure below is worked
// out by hand in the comments. Also the settings (weights, missing as zero, audited), the
// remembered table view, strict query parameters and who may read.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { loader as apiSession } from "~/routes/api/session-gradebook";
import { loader as apiCourse } from "~/routes/api/course-gradebook";
import { AuditEntry, CourseMembership, User } from "~/.server/db/models.server";
import { Bench, LabSession } from "~/.server/db/lab-sessions.server";
import { GroupMember } from "~/.server/db/groups.server";
import { Submission } from "~/.server/db/submissions.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { saveGradeSettings } from "~/.server/gradebook/settings.server";
import { saveTableView, tableView } from "~/.server/gradebook/table-views.server";
import { hashPassword } from "~/.server/passwords.server";
import { runCsv, simulateRun } from "~/lib/marking/simulate";
import { call, request } from "./helpers";
import { makePractical, PASSWORD, uploadRequest, type Practical } from "./practical-fixture";

let p: Practical;
let second: LabSession;
let staff: string;
let demonstrator: User;
let loner: User;

async function stored(groupIdx: number, session: LabSession, bench: Bench, version: number, fields: Partial<Submission>) {
  return Submission.create({
    groupId: p.groups[groupIdx].id, sessionId: session.id, benchId: bench.id, version, submittedAt: new Date(), status: "marked",
    measured: "concentrationA", timeUnit: "min", concentrationUnit: "mol/L", readings: null, reportedK: null, reportedMethod: null,
    timeColumn: null, valueColumn: null, submittedById: null, ...fields,
  } as never);
}

beforeAll(async () => {
  p = await makePractical("GB-T", { groups: 3 });
  staff = await p.cookie(p.instructor);
  const hash = await hashPassword(PASSWORD);
  demonstrator = await User.create({ email: "gb-t-demo@test.ratebook.invalid", displayName: "Demonstrator GB-T", role: "member", passwordHash: hash });
  await CourseMembership.create({ courseId: p.course.id, userId: demonstrator.id, role: "demonstrator" });
  // A student in no group: every practical is missing work for them.
  loner = await User.create({ email: "gb-t-loner@test.ratebook.invalid", displayName: "Zed Loner GB-T", role: "member", passwordHash: hash });
  await CourseMembership.create({ courseId: p.course.id, userId: loner.id, role: "student", studentNumber: "S-0099" });
  await CourseMembership.update({ studentNumber: "S-0001" }, { where: { courseId: p.course.id, userId: p.students[0].id } });

  // Practical 2: weight 2, deadline passed (due), benches for groups 1 and 2 only.
  second = await LabSession.create({
    courseId: p.course.id, reactionSystemId: p.system.id, title: "Practical GB-T 2", date: "2026-01-20", slotMinutes: 180, setupMinutes: 30,
    reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, samplingIntervalS: 60, rubric: p.session.rubric,
    deadline: new Date(Date.now() - 86_400_000), status: "notified", gradeWeight: 2,
  });
  const b2 = [
    await Bench.create({ sessionId: second.id, position: 1, label: "A", CA0: 0.02, CB0: 0.04, temperatureC: 30, groupId: p.groups[0].id }),
    await Bench.create({ sessionId: second.id, position: 2, label: "B", CA0: 0.02, CB0: 0.05, temperatureC: 35, groupId: p.groups[1].id }),
  ];

  // Group 1 (index 0) in practical 1: a real upload from the reference k at its bench, marked by the job.
  const bench = p.benches[0];
  const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: bench.CA0, CB0: bench.CB0 }, k: p.kAt(bench), n: 20, seed: 5, mistake: "none" });
  const cookie = await p.cookie(p.students[0]);
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[0].id}/submissions`, cookie, { bytes: runCsv(run), name: "run.csv" }, {
    measured: "concentrationA", reportedK: String(run.reportedK), reportedMethod: run.reportedMethod,
  }), { groupId: String(p.groups[0].id) });
  expect(res.status).toBe(202);
  await runJobsUntilIdle();

  // Group 2: version 1 marked 50, version 2 marked 70 (the latest counts). Late in version 2.
  await stored(1, p.session, p.benches[1], 1, { autoMark: 50 });
  await stored(1, p.session, p.benches[1], 2, { autoMark: 70, late: true, experimentPart: 60, analysisPart: 17.78, latePenalty: 7.78 });
  // Group 3: marking failed, an instructor set 40 by hand.
  await stored(2, p.session, p.benches[2], 1, { status: "failed", autoMark: null, overrideMark: 40, overrideReason: "Marked by hand from the bench notebook" });
  // Practical 2: group 1 marked 80, group 2 nothing.
  await stored(0, second, b2[0], 1, { autoMark: 80, flags: [{ code: "late-start", message: "invented flag", rows: [] }] });
});

afterAll(async () => {
  await p.course.destroy();
  await User.destroy({ where: { id: [demonstrator.id, loner.id] } });
  await closeSequelize();
});

const getSession = (id: number, cookie: string, query = "") =>
  call(apiSession, request(`/api/sessions/${id}/gradebook${query}`, { cookie }), { sessionId: String(id) }) as Promise<Response>;
const getCourse = (id: number, cookie: string, query = "") =>
  call(apiCourse, request(`/api/courses/${id}/gradebook${query}`, { cookie }), { courseId: String(id) }) as Promise<Response>;

describe("practical gradebook", () => {
  test("a row per group at a bench with its latest version's figures", async () => {
    const res = await getSession(p.session.id, staff);
    expect(res.status).toBe(200);
    const { rows } = await res.json();
    expect(rows.map((r: any) => r.group)).toEqual(["G1", "G2", "G3"]);
    const [g1, g2, g3] = rows;

    // Group 1: marked by the engine from readings made at the reference k, so the marking k is
    // near kAtT and its interval covers it; deviation = 100 (k − kRef) / kRef.
    const kRef = p.kAt(p.benches[0]);
    expect(g1.status).toBe("marked");
    expect(g1.kRefAtT).toBeCloseTo(kRef, 12);
    expect(g1.k).toBeGreaterThan(0.9 * kRef);
    expect(g1.k).toBeLessThan(1.1 * kRef);
    expect(g1.kCI95[0]).toBeLessThan(g1.k);
    expect(g1.kCI95[1]).toBeGreaterThan(g1.k);
    expect(g1.deviationPct).toBeCloseTo((100 * (g1.k - kRef)) / kRef, 6);
    // Within the 10 % band on both checks, on time: the whole mark.
    expect(g1.mark).toBe(100);
    expect(g1.feedRatio).toBeCloseTo(0.03 / 0.02, 12);

    // Group 2: the latest version (2) counts: 70, late, parts as stored.
    expect(g2).toMatchObject({ version: 2, mark: 70, late: true, overridden: false, experimentPart: 60, analysisPart: 17.78, latePenalty: 7.78, k: null });
    // kRef at 30 °C by Arrhenius from 0.11 s⁻¹ at 25 °C, Ea 50 kJ/mol:
    // 0.11 · exp(−50000/8.314462618 · (1/303.15 − 1/298.15)) = 0.11 · exp(0.33268…) = 0.15342…
    expect(g2.kRefAtT).toBeCloseTo(0.11 * Math.exp((-50000 / 8.314462618) * (1 / 303.15 - 1 / 298.15)), 12);
    expect(g2.kRefAtT).toBeCloseTo(0.15342, 4);

    // Group 3: failed marking with an override counts the override.
    expect(g3).toMatchObject({ status: "failed", mark: 40, overridden: true, overrideReason: "Marked by hand from the bench notebook" });
  });

  test("query parameters filter, and a malformed one is a 400 naming it", async () => {
    const marked = await (await getSession(p.session.id, staff, "?status=marked")).json();
    expect(marked.rows.map((r: any) => r.group)).toEqual(["G1", "G2"]);
    const flagged = await (await getSession(second.id, staff, "?flagged=true")).json();
    expect(flagged.rows.map((r: any) => r.group)).toEqual(["G1"]);
    const none = await (await getSession(second.id, staff, "?status=none")).json();
    expect(none.rows.map((r: any) => r.group)).toEqual(["G2"]);

    const bad = await getSession(p.session.id, staff, "?status=done&colour=red");
    expect(bad.status).toBe(400);
    const body = await bad.json();
    expect(body.errors.map((e: any) => e.path).sort()).toEqual(["query.colour", "query.status"]);
    expect(body.errors.find((e: any) => e.path === "query.status").message).toContain('"done"');
  });
});

describe("course gradebook", () => {
  test("each practical's mark and the weighted total, missing work left out", async () => {
    const res = await getCourse(p.course.id, staff);
    expect(res.status).toBe(200);
    const book = await res.json();
    expect(book.sessions.map((s: any) => [s.id, s.weight, s.due])).toEqual([[second.id, 2, true], [p.session.id, 1, false]]);
    const byName = Object.fromEntries(book.rows.map((r: any) => [r.name, r]));
    const s1 = byName["Student 1 GB-T"];
    expect(s1.studentId).toBe("S-0001");
    expect(s1.marks).toEqual({ [p.session.id]: 100, [second.id]: 80 });
    // (100·1 + 80·2) / 3 = 86.67
    expect(s1.total).toBe(86.67);
    // Student 2: 70 in practical 1; practical 2 due with nothing uploaded: left out -> 70.
    expect(byName["Student 2 GB-T"]).toMatchObject({ marks: { [p.session.id]: 70, [second.id]: null }, total: 70, missing: 1 });
    // Student 3: 40 (override); no bench in practical 2: missing, left out -> 40.
    expect(byName["Student 3 GB-T"]).toMatchObject({ total: 40, missing: 1 });
    // No group: nothing counts yet; one due practical missing.
    expect(byName["Zed Loner GB-T"]).toMatchObject({ studentId: "S-0099", group: null, total: null, missing: 1 });
    expect(book.rows.at(-1).name).toBe("Zed Loner GB-T");
  });

  test("missing work as zero, audited; not-yet-due work never counts as zero", async () => {
    await saveGradeSettings(p.instructor, p.course.id, { missingCountsAsZero: true, weights: { [p.session.id]: 1 } });
    const book = await (await getCourse(p.course.id, staff)).json();
    const byName = Object.fromEntries(book.rows.map((r: any) => [r.name, r]));
    expect(byName["Student 1 GB-T"].total).toBe(86.67);
    // (70·1 + 0·2) / 3 = 23.33;  (40·1 + 0·2) / 3 = 13.33
    expect(byName["Student 2 GB-T"].total).toBe(23.33);
    expect(byName["Student 3 GB-T"].total).toBe(13.33);
    // Practical 1 is not due, so only practical 2 counts as zero: 0 / 2 = 0.
    expect(byName["Zed Loner GB-T"].total).toBe(0);
    const audit = await AuditEntry.findOne({ where: { action: "gradebook.settings", entityId: String(p.course.id) } });
    expect(audit?.after).toMatchObject({ missingCountsAsZero: true });
    await expect(saveGradeSettings(p.instructor, p.course.id, { missingCountsAsZero: true, weights: { [second.id]: -1 } })).rejects.toThrow(/0 to 1000/);

    // Weight 0 leaves practical 2 out: student 1's total is their practical 1 mark.
    await saveGradeSettings(p.instructor, p.course.id, { missingCountsAsZero: true, weights: { [second.id]: 0 } });
    const after = await (await getCourse(p.course.id, staff)).json();
    expect(after.rows.find((r: any) => r.name === "Student 1 GB-T").total).toBe(100);
    await saveGradeSettings(p.instructor, p.course.id, { missingCountsAsZero: false, weights: { [second.id]: 2 } });
  });

  test("?sessions= keeps only those columns; a bad id is a 400", async () => {
    const only = await (await getCourse(p.course.id, staff, `?sessions=${second.id}`)).json();
    expect(only.sessions.map((s: any) => s.id)).toEqual([second.id]);
    expect(Object.keys(only.rows[0].marks)).toEqual([String(second.id)]);
    const bad = await getCourse(p.course.id, staff, "?sessions=1x,99999999");
    expect(bad.status).toBe(400);
    const { errors } = await bad.json();
    expect(errors).toHaveLength(2);
    expect(errors[0]).toMatchObject({ path: "query.sessions" });
  });

  test("staff read, students never, unknown ids 404", async () => {
    const demo = await p.cookie(demonstrator);
    expect((await getCourse(p.course.id, demo)).status).toBe(200);
    expect((await getSession(p.session.id, demo)).status).toBe(200);
    const student = await p.cookie(p.students[0]);
    expect((await getCourse(p.course.id, student)).status).toBe(403);
    expect((await getSession(p.session.id, student)).status).toBe(403);
    expect((await getCourse(99999999, staff)).status).toBe(404);
    expect((await getSession(99999999, staff)).status).toBe(404);
    expect((await getCourse(Number.NaN, staff)).status).toBe(404);
    expect((await call(apiCourse, request(`/api/courses/${p.course.id}/gradebook`), { courseId: String(p.course.id) })).status).toBe(401);
  });
});

describe("kept gradebooks follow every change", () => {
  test("a mark, a name, a group move and a passing deadline show on the next read", async () => {
    const read = async () => Object.fromEntries((await (await getCourse(p.course.id, staff)).json()).rows.map((r: any) => [r.userId, r]));
    const s2 = p.students[1];
    expect((await read())[s2.id].marks[p.session.id]).toBe(70);
    // An override on the counted version (outside any request, straight through the model).
    const latest = await Submission.findOne({ where: { groupId: p.groups[1].id, sessionId: p.session.id, version: 2 } });
    await latest!.update({ overrideMark: 65, overrideReason: "test" });
    expect((await read())[s2.id].marks[p.session.id]).toBe(65);
    await User.update({ displayName: "Student 2 GB-T renamed" }, { where: { id: s2.id }, individualHooks: false });
    expect((await read())[s2.id].name).toBe("Student 2 GB-T renamed");
    // The practical gradebook sees the override too.
    const rows = (await (await getSession(p.session.id, staff)).json()).rows;
    expect(rows.find((r: any) => r.group === "G2")).toMatchObject({ mark: 65, overridden: true });
    // Student 3 moves to group 1: their marks become group 1's (100 and 80).
    const s3 = p.students[2];
    await GroupMember.update({ groupId: p.groups[0].id }, { where: { userId: s3.id, courseId: p.course.id } });
    expect((await read())[s3.id]).toMatchObject({ group: "G1", marks: { [p.session.id]: 100, [second.id]: 80 } });
    await GroupMember.update({ groupId: p.groups[2].id }, { where: { userId: s3.id, courseId: p.course.id } });
    expect((await read())[s3.id].marks[p.session.id]).toBe(40);
    await latest!.update({ overrideMark: null, overrideReason: null });
    await User.update({ displayName: "Student 2 GB-T" }, { where: { id: s2.id } });

    // A deadline a moment away: practical 1 is not due now, and is due after it passes.
    await p.session.update({ deadline: new Date(Date.now() + 1500) });
    const before = (await (await getCourse(p.course.id, staff)).json()).sessions.find((s: any) => s.id === p.session.id);
    expect(before.due).toBe(false);
    await new Promise((r) => setTimeout(r, 1700));
    const after = (await (await getCourse(p.course.id, staff)).json()).sessions.find((s: any) => s.id === p.session.id);
    expect(after.due).toBe(true);
    await p.session.update({ deadline: null });
  });
});

describe("remembered table view", () => {
  test("saved per person and table, read back; junk reads as the default", async () => {
    await saveTableView(p.instructor.id, "session-gradebook", { hidden: ["CB0"], sort: [{ id: "mark", desc: true }], filters: [{ id: "group", value: "G" }], search: "G2" });
    expect(await tableView(p.instructor.id, "session-gradebook")).toEqual({ hidden: ["CB0"], sort: [{ id: "mark", desc: true }], filters: [{ id: "group", value: "G" }], search: "G2" });
    expect(await tableView(demonstrator.id, "session-gradebook")).toEqual({ hidden: [], sort: [], filters: [], search: "" });
    expect(await tableView(p.instructor.id, "course-gradebook")).toEqual({ hidden: [], sort: [], filters: [], search: "" });
  });
});
