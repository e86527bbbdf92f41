// What a student must do next: for each practical where one of their groups has a bench, the
// bench, its feed, the deadline, the upload page and the state of the group's latest upload.
// No figures derived from the reference k (no predicted minutes): those stay with staff.
import { Op } from "sequelize";
import type { User } from "../db/models.server";
import { Course } from "../db/models.server";
import { Bench, LabSession } from "../db/lab-sessions.server";
import { Group, GroupMember } from "../db/groups.server";
import { Submission } from "../db/submissions.server";

export type UploadState = "none" | "received" | "marked" | "refused" | "released";

export interface NextStep {
  sessionId: number;
  practical: string;
  courseCode: string;
  date: string;
  status: string;
  deadline: string | null;
  /** the course's clock, for showing the deadline */
  timeZone: string;
  benchId: number;
  bench: string;
  groupId: number;
  group: string;
  feed: { CA0: number; CB0: number; temperatureC: number };
  upload: { state: UploadState; version: number | null; submittedAt: string | null; reasons: string[] };
}

export async function nextSteps(user: Pick<User, "id">): Promise<NextStep[]> {
  const memberships = await GroupMember.findAll({ where: { userId: user.id }, attributes: ["groupId"] });
  if (!memberships.length) return [];
  const groupIds = memberships.map((m) => m.groupId);
  const benches = await Bench.findAll({
    where: { groupId: { [Op.in]: groupIds } },
    include: [{ model: LabSession, as: "session" }, { model: Group, as: "group" }],
  });
  if (!benches.length) return [];
  const courses = new Map((await Course.findAll({ where: { id: [...new Set(benches.map((b) => b.session!.courseId))] }, attributes: ["id", "code", "timeZone"] })).map((c) => [c.id, c]));
  // every version of these groups' uploads in one query, newest first: the first seen per bench is its latest
  const versions = await Submission.findAll({
    where: { [Op.or]: benches.map((b) => ({ groupId: b.groupId!, sessionId: b.sessionId })) },
    attributes: ["groupId", "sessionId", "version", "status", "submittedAt", "problems"],
    order: [["version", "DESC"]],
  });
  const latestOf = new Map<string, Submission>();
  for (const v of versions) if (!latestOf.has(`${v.groupId}:${v.sessionId}`)) latestOf.set(`${v.groupId}:${v.sessionId}`, v);
  const steps: NextStep[] = [];
  for (const b of benches) {
    const s = b.session!;
    const latest = latestOf.get(`${b.groupId}:${s.id}`);
    const released = s.marksReleasedAt !== null;
    let state: UploadState = "none";
    if (latest) {
      if (latest.status === "refused") state = "refused";
      else if (released && latest.status === "marked") state = "released";
      else if (latest.status === "marked") state = "marked";
      else state = "received"; // queued, or failed to mark (students see it as waiting)
    }
    steps.push({
      sessionId: s.id,
      practical: s.title,
      courseCode: courses.get(s.courseId)?.code ?? "",
      timeZone: courses.get(s.courseId)?.timeZone ?? "UTC",
      date: s.date,
      status: s.status,
      deadline: s.deadline ? s.deadline.toISOString() : null,
      benchId: b.id,
      bench: b.label,
      groupId: b.groupId!,
      group: b.group?.name ?? "",
      feed: { CA0: b.CA0, CB0: b.CB0, temperatureC: b.temperatureC },
      upload: {
        state,
        version: latest?.version ?? null,
        submittedAt: latest ? latest.submittedAt.toISOString() : null,
        reasons: state === "refused" ? (latest!.problems ?? []).slice(0, 5).map((p) => (p.row ? `row ${p.row}${p.column ? `, column ${p.column}` : ""}: ${p.message}` : p.message)) : [],
      },
    });
  }
  // open practicals first, nearest date first
  const today = new Date().toISOString().slice(0, 10);
  return steps.sort((a, b) => Number(a.status === "closed") - Number(b.status === "closed") || Math.abs(Date.parse(a.date) - Date.parse(today)) - Math.abs(Date.parse(b.date) - Date.parse(today)));
}
