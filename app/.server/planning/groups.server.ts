// Groups of a course: who is in which, and the caller's own groups with their benches.
import { Group, GroupMember } from "../db/groups.server";
import { Bench } from "../db/lab-sessions.server";
import type { User } from "../db/models.server";

export interface MyGroup {
  id: number;
  name: string;
  courseId: number;
  sessionId: number | null;
  benchId: number | null;
}

/** The person's groups, one entry per session where the group has a bench (or one with nulls). */
export async function groupsOf(user: User): Promise<MyGroup[]> {
  const memberships = await GroupMember.findAll({
    where: { userId: user.id },
    include: [{ model: Group, as: "group", include: [{ model: Bench, as: "benches", attributes: ["id", "sessionId"] }] }],
    order: [["id", "ASC"]],
  });
  const out: MyGroup[] = [];
  for (const m of memberships) {
    const g = m.group!;
    const benches = ((g as unknown as { benches?: Bench[] }).benches ?? []).slice().sort((a, b) => a.sessionId - b.sessionId);
    if (!benches.length) out.push({ id: g.id, name: g.name, courseId: g.courseId, sessionId: null, benchId: null });
    for (const b of benches) out.push({ id: g.id, name: g.name, courseId: g.courseId, sessionId: b.sessionId, benchId: b.id });
  }
  return out;
}
