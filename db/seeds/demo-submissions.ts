// Demo data: invented submissions for the demo course's planned practical, so the review queue
// shows marks and flags at first start. Each group's readings are made from the reference k at
// its bench's temperature (engine closed forms plus seeded noise); a few groups make one of the
// usual mistakes each. An invented scenario, not real students' work. Safe to run again: a
// practical that already has submissions is left alone.
import { Op } from "sequelize";
import { Course, User } from "../../app/.server/db/models.server";
import { GroupMember } from "../../app/.server/db/groups.server";
import { Bench, LabSession } from "../../app/.server/db/lab-sessions.server";
import { ReactionSystem } from "../../app/.server/db/reaction-systems.server";
import { Submission } from "../../app/.server/db/submissions.server";
import { createSubmission } from "../../app/.server/submissions/service.server";
import { markSubmission } from "../../app/.server/submissions/marking.server";
import { rateConstantAt } from "../../app/lib/kinetics";
import { celsiusToKelvin } from "../../app/lib/kinetics/units";
import { runCsv, simulateRun, type Mistake } from "../../app/lib/marking/simulate";

const DEMO_STUDENT = "student@demo.ratebook.invalid";
/** one of each typical mistake, then good runs */
const MISTAKE_ORDER: Mistake[] = ["minutes-as-seconds", "mmol-as-mol", "wrong-line", "low-conversion", "wild-reading"];

export async function seedDemoSubmissions(courseCode = "KIN-DEMO"): Promise<number> {
  const course = await Course.findOne({ where: { code: courseCode } });
  if (!course) return 0;
  const sessions = await LabSession.findAll({ where: { courseId: course.id }, include: [{ model: ReactionSystem, as: "reactionSystem" }], order: [["date", "ASC"], ["id", "ASC"]] });
  const demoStudent = await User.findOne({ where: { email: DEMO_STUDENT } });
  for (const session of sessions) {
    const benches = await Bench.findAll({ where: { sessionId: session.id, groupId: { [Op.ne]: null } }, order: [["position", "ASC"]] });
    if (!benches.length) continue;
    if ((await Submission.count({ where: { sessionId: session.id } })) > 0) return 0;
    const system = session.reactionSystem!;
    const cal = (system.calibration ?? {}) as Record<string, unknown>;
    // the wrong straight line only shows on a bench whose feed needs the other form
    const unequal = benches.filter((b) => Math.abs(b.CB0 - (system.coeffB / system.coeffA) * b.CA0) > 1e-6 * b.CB0);
    const plan = new Map<number, Mistake>();
    // the demo student's bench is left to upload in the demo, so it makes no planned mistake
    const studentGroups = demoStudent ? new Set((await GroupMember.findAll({ where: { userId: demoStudent.id } })).map((m) => m.groupId)) : new Set<number>();
    const pool = benches.filter((b) => !studentGroups.has(b.groupId!));
    for (const m of MISTAKE_ORDER) {
      const choices = m === "wrong-line" && unequal.length ? pool.filter((b) => unequal.includes(b)) : pool;
      const bench = choices.find((b) => !plan.has(b.id));
      if (bench) plan.set(bench.id, m);
    }
    let made = 0;
    for (const [i, bench] of benches.entries()) {
      const members = await GroupMember.findAll({ where: { groupId: bench.groupId! }, include: [{ model: User, as: "user" }], order: [["id", "ASC"]] });
      // The demo student's own group is left to upload in the demo (and the browser test).
      if (demoStudent && members.some((m) => m.userId === demoStudent.id)) continue;
      const submitter = members[0]?.user ?? (await User.findOne({ where: { email: "instructor@demo.ratebook.invalid" } }));
      if (!submitter) continue;
      const k = rateConstantAt(system.kRef, celsiusToKelvin(system.TrefC), system.EaKJ * 1000, celsiusToKelvin(bench.temperatureC));
      const mistake = plan.get(bench.id) ?? "none";
      const run = simulateRun({
        reaction: { a: system.coeffA, b: system.coeffB, orderA: system.orderA, orderB: system.orderB },
        feed: { CA0: bench.CA0, CB0: bench.CB0 },
        k,
        n: 16 + (i % 5),
        seed: 1000 + bench.id,
        mistake,
        // groups without a mistake send the practical's own readings when it follows conductivity
        signal: system.measured === "conductivity" && mistake === "none" ? { S0: Number(cal.conductivityStart ?? 2.4), Sinf: Number(cal.conductivityEnd ?? 0.95), noise: 0.004 } : undefined,
      });
      const measured = system.measured === "conductivity" && mistake === "none" ? "conductivity" : "concentrationA";
      const text = `# invented demo readings, bench ${bench.label}\n${runCsv(run, i % 2 === 1)}`;
      const bytes = new TextEncoder().encode(text);
      const created = await createSubmission(
        submitter,
        bench.groupId!,
        { bytes, name: `bench-${bench.label}-readings.csv`, type: "text/csv", size: bytes.byteLength },
        {
          sessionId: String(session.id),
          measured,
          reportedK: String(run.reportedK),
          reportedMethod: run.reportedMethod,
        },
        true,
      );
      // marked here rather than waiting for the worker, so the queue is ready at first start
      await markSubmission(created.id);
      made++;
    }
    return made;
  }
  return 0;
}
