// Demo planning data, an invented scenario: two invented reaction systems (values made up for the
// demo, not measured data), the demo course's students in groups, and one planned practical of
// eight benches with a group at each. The demo student is in Group 1, at bench 1.
import type { Transaction } from "sequelize";
import { Course, CourseMembership, User } from "../../app/.server/db/models.server";
import { Group, GroupMember } from "../../app/.server/db/groups.server";
import { ReactionSystem } from "../../app/.server/db/reaction-systems.server";
import { Bench, DEFAULT_RUBRIC, LabSession } from "../../app/.server/db/lab-sessions.server";
import { proposeBenches, type ReactionForDesign } from "../../app/lib/planning/feed-design";

export const DEMO_REACTIONS = [
  {
    name: "Demo ester saponification (invented)",
    speciesA: "demo ester (R-CO-OR')",
    speciesB: "hydroxide (OH⁻)",
    coeffA: 1,
    coeffB: 1,
    orderA: 1,
    orderB: 1,
    kRef: 0.11,
    TrefC: 25,
    EaKJ: 45,
    referenceSource: "Invented demo values, shaped like a typical ester saponification; not measured data.",
    measured: "conductivity" as const,
    calibration: { conductivityStart: 2.4, conductivityEnd: 0.95 },
    stocks: [
      { species: "A" as const, label: "demo ester", concentrationMolL: 0.1 },
      { species: "B" as const, label: "sodium hydroxide", concentrationMolL: 0.1 },
    ],
    hazards: [
      { reagent: "sodium hydroxide solution, 0.1 mol/L", hStatements: ["H290", "H314"], pictograms: ["GHS05"], handling: "Wear eye protection and gloves; rinse splashes with plenty of water." },
      { reagent: "demo ester (neat, for making the stock)", hStatements: ["H225", "H319", "H336"], pictograms: ["GHS02", "GHS07"], handling: "Keep away from flames; dispense in a fume cupboard." },
    ],
  },
  {
    name: "Demo diester with two hydroxides (invented)",
    speciesA: "demo diester",
    speciesB: "hydroxide (OH⁻)",
    coeffA: 1,
    coeffB: 2,
    orderA: 1,
    orderB: 1,
    kRef: 0.045,
    TrefC: 25,
    EaKJ: 52,
    referenceSource: "Invented demo values for a 1:2 reaction followed by titration; not measured data.",
    measured: "titration" as const,
    calibration: { titrantMolL: 0.02, aliquotMl: 10, titratedSpecies: "B" as const, titrant: "hydrochloric acid, 0.02 mol/L" },
    stocks: [
      { species: "A" as const, label: "demo diester", concentrationMolL: 0.05 },
      { species: "B" as const, label: "sodium hydroxide", concentrationMolL: 0.2 },
    ],
    hazards: [
      { reagent: "sodium hydroxide solution, 0.2 mol/L", hStatements: ["H290", "H314"], pictograms: ["GHS05"], handling: "Wear eye protection and gloves." },
      { reagent: "hydrochloric acid, 0.02 mol/L (titrant)", hStatements: ["H290"], pictograms: ["GHS05"], handling: "Wear eye protection." },
    ],
  },
];

/** More invented students so the demo course fills eight groups of two. */
export const MORE_STUDENTS = ["Ivo Petrak", "Jun Aalto", "Kai Mensah", "Lia Ferreira", "Milo Strand", "Nia Kowal", "Oren Sato"];

export const DEMO_SESSION_TITLE = "Demo practical: saponification at eight benches (invented)";

export async function seedPlanningDemo(course: Course, transaction: Transaction, hash: () => Promise<string>) {
  // students: the existing demo students plus more, each with an invented student ID
  for (const [i, n] of MORE_STUDENTS.entries()) {
    const email = `student${i + 10}@demo.ratebook.invalid`;
    let user = await User.findOne({ where: { email }, transaction });
    user ??= await User.create({ email, displayName: `${n} (demo student)`, role: "member", passwordHash: await hash() }, { transaction });
    await CourseMembership.findOrCreate({ where: { courseId: course.id, userId: user.id }, defaults: { courseId: course.id, userId: user.id, role: "student" }, transaction });
  }
  const students = await CourseMembership.findAll({ where: { courseId: course.id, role: "student" }, include: [{ model: User, as: "user" }], order: [["id", "ASC"]], transaction });
  // the demo student first, so it lands in Group 1
  students.sort((a, b) => (a.user!.email === "student@demo.ratebook.invalid" ? -1 : b.user!.email === "student@demo.ratebook.invalid" ? 1 : 0));
  for (const [i, m] of students.entries()) if (!m.studentNumber) await m.update({ studentNumber: `D${String(1001 + i)}` }, { transaction });

  for (const r of DEMO_REACTIONS) {
    await ReactionSystem.findOrCreate({ where: { courseId: course.id, name: r.name }, defaults: { courseId: course.id, ...r }, transaction });
  }

  if ((await Group.count({ where: { courseId: course.id }, transaction })) === 0) {
    for (let g = 0; g < 8; g++) {
      const group = await Group.create({ courseId: course.id, name: `Group ${g + 1}` }, { transaction });
      for (const m of students.slice(g * 2, g * 2 + 2)) await GroupMember.create({ groupId: group.id, courseId: course.id, userId: m.userId }, { transaction });
    }
  }

  if (await LabSession.findOne({ where: { courseId: course.id, title: DEMO_SESSION_TITLE }, transaction })) return;
  const rs = await ReactionSystem.findOne({ where: { courseId: course.id, name: DEMO_REACTIONS[0].name }, transaction });
  const reaction: ReactionForDesign = { coeffA: rs!.coeffA, coeffB: rs!.coeffB, orderA: rs!.orderA, orderB: rs!.orderB, kRef: rs!.kRef, TrefC: rs!.TrefC, EaKJ: rs!.EaKJ };
  const design = proposeBenches(reaction, { benchCount: 8, CA0: 0.01, ratioMin: 0.5, ratioMax: 2, tempMinC: 20, tempMaxC: 35 });
  if (!design.ok) throw new Error(`demo design failed: ${design.problems[0].message}`);
  const session = await LabSession.create(
    {
      courseId: course.id,
      reactionSystemId: rs!.id,
      title: DEMO_SESSION_TITLE,
      date: "2027-02-10",
      slotMinutes: 180,
      setupMinutes: 30,
      reactorVolumeMl: 250,
      stockAMolL: 0.1,
      stockBMolL: 0.1,
      samplingIntervalS: 60,
      targetConversion: 0.8,
      rubric: DEFAULT_RUBRIC,
      deadline: new Date("2027-02-17T17:00:00Z"),
      status: "planned",
    },
    { transaction },
  );
  const groups = await Group.findAll({ where: { courseId: course.id }, order: [["id", "ASC"]], transaction });
  await Bench.bulkCreate(
    design.benches.map((b, i) => ({ sessionId: session.id, position: i + 1, ...b, groupId: groups[i]?.id ?? null })),
    { transaction },
  );
}
