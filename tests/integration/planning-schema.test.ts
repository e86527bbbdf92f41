// The planning tables hold their own rules: one feed per bench within a session, one bench per
// group within a session, one group per student within a course, temperatures 0-100 C.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { Course, User, sequelize } from "~/.server/db/models.server";
import { Group, GroupMember } from "~/.server/db/groups.server";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { Bench, DEFAULT_RUBRIC, LabSession } from "~/.server/db/lab-sessions.server";
import { closeSequelize } from "~/.server/db/sequelize.server";

let course: Course;
let session: LabSession;

beforeAll(async () => {
  course = await Course.create({ code: "SCHEMA-T", title: "Schema test course (invented)", term: "" });
  const rs = await ReactionSystem.create({
    courseId: course.id,
    name: "Invented A + B",
    speciesA: "ester X",
    speciesB: "hydroxide",
    coeffA: 1,
    coeffB: 1,
    orderA: 1,
    orderB: 1,
    kRef: 0.1,
    TrefC: 25,
    EaKJ: 40,
    measured: "conductivity",
  });
  session = await LabSession.create({
    courseId: course.id,
    reactionSystemId: rs.id,
    title: "Schema test",
    date: "2027-01-15",
    slotMinutes: 180,
    setupMinutes: 30,
    reactorVolumeMl: 250,
    stockAMolL: 0.1,
    stockBMolL: 0.1,
    samplingIntervalS: 120,
    rubric: DEFAULT_RUBRIC,
    deadline: null,
  });
});

afterAll(async () => {
  await course.destroy();
  await closeSequelize();
});

describe("planning schema", () => {
  test("two benches of one session cannot share a feed and temperature", async () => {
    await Bench.create({ sessionId: session.id, position: 1, label: "1", CA0: 0.02, CB0: 0.02, temperatureC: 25, groupId: null });
    await expect(Bench.create({ sessionId: session.id, position: 2, label: "2", CA0: 0.02, CB0: 0.02, temperatureC: 25, groupId: null })).rejects.toThrow();
    await expect(Bench.create({ sessionId: session.id, position: 3, label: "3", CA0: 0.02, CB0: 0.02, temperatureC: 101, groupId: null })).rejects.toThrow();
  });

  test("a student is in one group of a course, and a group has one bench a session", async () => {
    const student = await User.create({ email: "schema-student@demo.ratebook.invalid", displayName: "Schema student (invented)", role: "member", passwordHash: null });
    const [g1, g2] = await Promise.all([Group.create({ courseId: course.id, name: "G1" }), Group.create({ courseId: course.id, name: "G2" })]);
    await GroupMember.create({ groupId: g1.id, courseId: course.id, userId: student.id });
    await expect(GroupMember.create({ groupId: g2.id, courseId: course.id, userId: student.id })).rejects.toThrow();
    // course_id must match the group's course
    const other = await Course.create({ code: "SCHEMA-U", title: "Other (invented)", term: "" });
    await expect(GroupMember.create({ groupId: g2.id, courseId: other.id, userId: student.id })).rejects.toThrow();
    await other.destroy();

    await Bench.create({ sessionId: session.id, position: 4, label: "4", CA0: 0.03, CB0: 0.02, temperatureC: 25, groupId: g1.id });
    await expect(Bench.create({ sessionId: session.id, position: 5, label: "5", CA0: 0.04, CB0: 0.02, temperatureC: 25, groupId: g1.id })).rejects.toThrow();
    const bench = await Bench.findOne({ where: { sessionId: session.id, groupId: g1.id } });
    expect(bench!.CA0).toBe(0.03);
    await student.destroy();
  });

  test("the job queue's schema is installed by the migrations", async () => {
    const [rows] = await sequelize.query("select count(*)::int as n from pg_proc p join pg_namespace n on n.oid = p.pronamespace where n.nspname = 'graphile_worker' and p.proname = 'add_job'");
    expect((rows as Array<{ n: number }>)[0].n).toBeGreaterThanOrEqual(1);
  });
});
