// A group of the demo student with a bench and one marked submission, which the demo instructor
// and demonstrator may review: the demo's own when it has one, else a small invented practical
// made here once (course API-DOC). Used by the OpenAPI test and the access table.
import { Course, CourseMembership, User } from "~/.server/db/models.server";
import { Group, GroupMember } from "~/.server/db/groups.server";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { Bench, DEFAULT_RUBRIC, LabSession } from "~/.server/db/lab-sessions.server";
import { Submission } from "~/.server/db/submissions.server";
import { createSubmission } from "~/.server/submissions/service.server";
import { markSubmission } from "~/.server/submissions/marking.server";

export interface SubmissionFixture {
  groupId: number;
  sessionId: number;
  submissionId: number;
}

export async function submissionFixture(): Promise<SubmissionFixture> {
  const student = (await User.findOne({ where: { email: "student@demo.ratebook.invalid" } }))!;
  const instructor = (await User.findOne({ where: { email: "instructor@demo.ratebook.invalid" } }))!;
  const demonstrator = (await User.findOne({ where: { email: "demonstrator@demo.ratebook.invalid" } }))!;
  for (const m of await GroupMember.findAll({ where: { userId: student.id } })) {
    const teaches = await CourseMembership.findOne({ where: { courseId: m.courseId, userId: instructor.id, role: "instructor" } });
    const helps = await CourseMembership.findOne({ where: { courseId: m.courseId, userId: demonstrator.id, role: "demonstrator" } });
    const submission = await Submission.findOne({ where: { groupId: m.groupId, status: "marked" }, order: [["id", "ASC"]] });
    if (teaches && helps && submission) return { groupId: m.groupId, sessionId: submission.sessionId, submissionId: submission.id };
  }
  const course = await Course.create({ code: "API-DOC", title: "API document check (invented)", term: "" });
  await CourseMembership.create({ courseId: course.id, userId: instructor.id, role: "instructor" });
  await CourseMembership.create({ courseId: course.id, userId: demonstrator.id, role: "demonstrator" });
  await CourseMembership.create({ courseId: course.id, userId: student.id, role: "student" });
  const system = await ReactionSystem.create({
    courseId: course.id, name: "Invented A + B", speciesA: "ester X (invented)", speciesB: "hydroxide", coeffA: 1, coeffB: 1, orderA: 1, orderB: 1,
    kRef: 0.11, TrefC: 25, EaKJ: 50, measured: "concentration",
  });
  const session = await LabSession.create({
    courseId: course.id, reactionSystemId: system.id, title: "API document check", date: new Date().toISOString().slice(0, 10), slotMinutes: 180, setupMinutes: 30,
    reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, samplingIntervalS: 60, rubric: DEFAULT_RUBRIC, deadline: null, status: "planned",
  });
  const group = await Group.create({ courseId: course.id, name: "API group" });
  await GroupMember.create({ groupId: group.id, courseId: course.id, userId: student.id });
  await Bench.create({ sessionId: session.id, position: 1, label: "1", CA0: 0.02, CB0: 0.03, temperatureC: 25, groupId: group.id });
  const bytes = new TextEncoder().encode("t / min,CA (mmol/L)\n0,20\n2,17.1\n4,14.9\n6,13.2\n8,11.8\n10,10.7\n");
  const created = await createSubmission(student, group.id, { bytes, name: "invented-run.csv", type: "text/csv", size: bytes.byteLength }, { sessionId: String(session.id), measured: "concentrationA" }, true);
  await markSubmission(created.id);
  return { groupId: group.id, sessionId: session.id, submissionId: created.id };
}
