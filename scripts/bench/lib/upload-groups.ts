// Shared by the upload benchmarks (upload-burst.ts, cluster.ts): a practical of many groups,
// each with its own bench (feed, temperature) and API token, and each group's readings made from
// the engine's closed forms at its bench with seeded noise.
// Invented reference for the bench practical: A + B, first order in each.
export const REFERENCE = { kRef: 0.11, TrefC: 25, EaKJ: 50 };


export interface Seeded {
  sessionId: number;
  groups: Array<{ groupId: number; token: string; CA0: number; CB0: number; temperatureC: number }>;
}

/** A course with one practical of `groups` groups (one student, one bench, one API token each). */
export async function seedUploadGroups(groups_n: number, code = "BENCH-UP"): Promise<Seeded> {
  const { Course, CourseMembership, User } = await import("../../../app/.server/db/models.server");
  const { Group, GroupMember } = await import("../../../app/.server/db/groups.server");
  const { ReactionSystem } = await import("../../../app/.server/db/reaction-systems.server");
  const { Bench, LabSession } = await import("../../../app/.server/db/lab-sessions.server");
  const { hashPassword } = await import("../../../app/.server/passwords.server");
  const { createApiToken } = await import("../../../app/.server/api-tokens.server");
  const course = await Course.create({ code, title: "Upload benchmark course (invented)", term: "" });
  const hash = await hashPassword("bench-only-password");
  const system = await ReactionSystem.create({
    courseId: course.id, name: "Invented A + B (bench)", speciesA: "ester X (invented)", speciesB: "hydroxide", coeffA: 1, coeffB: 1, orderA: 1, orderB: 1,
    ...REFERENCE, measured: "concentration",
  });
  const session = await LabSession.create({
    courseId: course.id, reactionSystemId: system.id, title: "Upload benchmark practical (invented)", date: new Date().toISOString().slice(0, 10),
    slotMinutes: 180, setupMinutes: 30, reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, samplingIntervalS: 60,
    rubric: { fullWithinPct: 10, partialWithinPct: 25, partialFraction: 0.5, analysisWeight: 0.4, experimentWeight: 0.6, latePenaltyPct: 10 },
    deadline: null, status: "planned",
  });
  const groups: Seeded["groups"] = [];
  for (let i = 0; i < groups_n; i++) {
    const group = await Group.create({ courseId: course.id, name: `Bench group ${i + 1}` });
    const student = await User.create({ email: `bench-s${i + 1}@bench.ratebook.invalid`, displayName: `Bench student ${i + 1}`, role: "member", passwordHash: hash });
    await CourseMembership.create({ courseId: course.id, userId: student.id, role: "student" });
    await GroupMember.create({ groupId: group.id, courseId: course.id, userId: student.id });
    // every bench its own (feed, temperature): 5 temperatures x GROUPS/5 feeds of B
    const temperatureC = 20 + 5 * (i % 5);
    const CB0 = Number((0.025 + 0.0005 * Math.floor(i / 5)).toFixed(4));
    await Bench.create({ sessionId: session.id, position: i + 1, label: String(i + 1), CA0: 0.02, CB0, temperatureC, groupId: group.id });
    const { token } = await createApiToken(student, "upload benchmark", 1);
    groups.push({ groupId: group.id, token, CA0: 0.02, CB0, temperatureC });
  }
  return { sessionId: session.id, groups };
}

/** A group's readings: the engine's closed form at its bench, seeded noise; and its own k. */
export async function readingsFor(g: Seeded["groups"][number], seedValue: number, rows: number) {
  const { simulateRun, runCsv } = await import("../../../app/lib/marking/simulate");
  const { rateConstantAt } = await import("../../../app/lib/kinetics/index");
  const k = rateConstantAt(REFERENCE.kRef, REFERENCE.TrefC + 273.15, REFERENCE.EaKJ * 1000, g.temperatureC + 273.15);
  const run = simulateRun({ reaction: { a: 1, b: 1, orderA: 1, orderB: 1 }, feed: { CA0: g.CA0, CB0: g.CB0 }, k, n: rows, seed: seedValue });
  return { csv: runCsv(run), reportedK: String(run.reportedK), reportedMethod: run.reportedMethod };
}

