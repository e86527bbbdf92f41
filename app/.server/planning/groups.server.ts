// Groups of a course: who is in which, and the caller's own groups with their benches.
import { QueryTypes } from "sequelize";
import { CourseMembership, sequelize, User as UserModel, type User } from "../db/models.server";
import { Group, GroupMember } from "../db/groups.server";
import { recordAudit } from "../audit.server";
import { naturalCompare } from "~/lib/natural-order";
import { GROUP_ORDERS, orderForGroups, type GroupOrder } from "~/lib/planning/group-order";

export interface MyGroup {
  id: number;
  name: string;
  courseId: number;
  sessionId: number | null;
  benchId: number | null;
}

/**
 * The person's groups, one entry per session where the group has a bench (or one with nulls).
 * One plain query: it runs on every `GET /api/me`, where the ORM's nested include cost several
 * times the query (scripts/bench/api-me-bench.ts).
 */
export async function groupsOf(user: Pick<User, "id">): Promise<MyGroup[]> {
  return sequelize.query<MyGroup>(
    `select g.id, g.name, g.course_id as "courseId", b.session_id as "sessionId", b.id as "benchId"
       from group_members gm join groups g on g.id = gm.group_id left join benches b on b.group_id = g.id
      where gm.user_id = $1 order by gm.id, b.session_id`,
    { bind: [user.id], type: QueryTypes.SELECT },
  );
}

// ---- managing groups (instructors) ----

type Result = { ok: true; message: string } | { ok: false; field: string; message: string };

/** Groups with their members, and the course's students in no group. */
export async function courseGroups(courseId: number) {
  const groups = await Group.findAll({
    where: { courseId },
    include: [{ model: GroupMember, as: "members", include: [{ model: UserModel, as: "user", attributes: ["id", "displayName", "email"] }] }],
    order: [["name", "ASC"]],
  });
  const students = await CourseMembership.findAll({ where: { courseId, role: "student" }, include: [{ model: UserModel, as: "user", attributes: ["id", "displayName", "email"] }] });
  const grouped = new Set(groups.flatMap((g) => (g.members ?? []).map((m) => m.userId)));
  groups.sort((a, b) => naturalCompare(a.name, b.name));
  return {
    groups: groups.map((g) => ({
      id: g.id,
      name: g.name,
      members: (g.members ?? []).map((m) => ({ userId: m.userId, name: m.user!.displayName })).sort((a, b) => a.name.localeCompare(b.name)),
    })),
    ungrouped: students
      .filter((s) => !grouped.has(s.userId))
      .map((s) => ({ userId: s.userId, name: s.user!.displayName, studentNumber: s.studentNumber, rosterIndex: s.id }))
      .sort((a, b) => a.name.localeCompare(b.name)),
    students: students.map((s) => ({ userId: s.userId, name: s.user!.displayName })).sort((a, b) => a.name.localeCompare(b.name)),
  };
}

function checkName(name: string): string | null {
  if (!name) return "Enter a group name.";
  if (name.length > 80) return "Use at most 80 characters.";
  return null;
}

export async function createGroup(actor: User, courseId: number, name: string): Promise<Result> {
  const problem = checkName(name);
  if (problem) return { ok: false, field: "name", message: problem };
  if (await Group.findOne({ where: { courseId, name } })) return { ok: false, field: "name", message: `There is already a group called ${name}.` };
  await sequelize.transaction(async (transaction) => {
    const g = await Group.create({ courseId, name }, { transaction });
    await recordAudit({ actorId: actor.id, action: "group.created", entityType: "group", entityId: g.id, after: { name } }, transaction);
  });
  return { ok: true, message: `Group ${name} created.` };
}

export async function renameGroup(actor: User, courseId: number, groupId: number, name: string): Promise<Result> {
  const group = await Group.findOne({ where: { id: groupId, courseId } });
  if (!group) return { ok: false, field: "form", message: "That group is not in this course." };
  const problem = checkName(name);
  if (problem) return { ok: false, field: "name", message: problem };
  const twin = await Group.findOne({ where: { courseId, name } });
  if (twin && twin.id !== group.id) return { ok: false, field: "name", message: `There is already a group called ${name}.` };
  const before = group.name;
  await sequelize.transaction(async (transaction) => {
    await group.update({ name }, { transaction });
    await recordAudit({ actorId: actor.id, action: "group.renamed", entityType: "group", entityId: group.id, before: { name: before }, after: { name } }, transaction);
  });
  return { ok: true, message: `Group ${before} is now ${name}.` };
}

/** Moves a student to a group (or out of every group with groupId null). */
export async function moveStudent(actor: User, courseId: number, userId: number, groupId: number | null): Promise<Result> {
  const membership = await CourseMembership.findOne({ where: { courseId, userId, role: "student" } });
  if (!membership) return { ok: false, field: "form", message: "That person is not a student of this course." };
  const group = groupId === null ? null : await Group.findOne({ where: { id: groupId, courseId } });
  if (groupId !== null && !group) return { ok: false, field: "form", message: "That group is not in this course." };
  await sequelize.transaction(async (transaction) => {
    const old = await GroupMember.findOne({ where: { courseId, userId }, transaction });
    await GroupMember.destroy({ where: { courseId, userId }, transaction });
    if (group) await GroupMember.create({ groupId: group.id, courseId, userId }, { transaction });
    await recordAudit({ actorId: actor.id, action: "group.member-moved", entityType: "group_member", entityId: userId, before: { groupId: old?.groupId ?? null }, after: { groupId } }, transaction);
  });
  return { ok: true, message: group ? `Moved to ${group.name}.` : "Taken out of the group." };
}

export async function deleteGroup(actor: User, courseId: number, groupId: number): Promise<Result> {
  const group = await Group.findOne({ where: { id: groupId, courseId } });
  if (!group) return { ok: false, field: "form", message: "That group is not in this course." };
  const n = await GroupMember.count({ where: { groupId } });
  if (n > 0) return { ok: false, field: "form", message: `${group.name} still has ${n} member(s); move them first. Only an empty group can be deleted.` };
  await sequelize.transaction(async (transaction) => {
    await group.destroy({ transaction });
    await recordAudit({ actorId: actor.id, action: "group.deleted", entityType: "group", entityId: groupId, before: { name: group.name } }, transaction);
  });
  return { ok: true, message: `Group ${group.name} deleted.` };
}

/**
 * Puts every student who is in no group into new groups of `size` (the last may be smaller), taken
 * by name, in roster order, or shuffled with `seed` (the same seed forms the same groups again).
 */
export async function formGroups(actor: User, courseId: number, size: number, order: unknown = "name", seedText: unknown = ""): Promise<Result> {
  if (!Number.isInteger(size) || size < 1 || size > 20) return { ok: false, field: "size", message: "Choose a group size from 1 to 20." };
  if (!GROUP_ORDERS.includes(order as GroupOrder)) return { ok: false, field: "order", message: "Choose by name, in roster order or shuffled." };
  const seed = Number(String(seedText ?? "").trim());
  if (order === "shuffled" && !(Number.isInteger(seed) && seed >= 1 && seed <= 999_999)) return { ok: false, field: "seed", message: "Give a seed from 1 to 999999 (a whole number)." };
  const { ungrouped: found, groups } = await courseGroups(courseId);
  const ungrouped = orderForGroups(found, order as GroupOrder, seed);
  if (!ungrouped.length) return { ok: false, field: "size", message: "Every student is already in a group." };
  const names = new Set(groups.map((g) => g.name));
  let next = 1;
  const freshName = () => {
    while (names.has(`Group ${next}`)) next++;
    names.add(`Group ${next}`);
    return `Group ${next}`;
  };
  let made = 0;
  await sequelize.transaction(async (transaction) => {
    for (let i = 0; i < ungrouped.length; i += size) {
      const g = await Group.create({ courseId, name: freshName() }, { transaction });
      made++;
      for (const s of ungrouped.slice(i, i + size)) await GroupMember.create({ groupId: g.id, courseId, userId: s.userId }, { transaction });
    }
    await recordAudit({ actorId: actor.id, action: "group.formed", entityType: "course", entityId: courseId, after: { groups: made, size, order, ...(order === "shuffled" ? { seed } : {}) } }, transaction);
  });
  const how = order === "shuffled" ? `, shuffled with seed ${seed} (the same seed forms the same groups again)` : order === "roster" ? ", in roster order" : ", by name";
  return { ok: true, message: `${made} group(s) of up to ${size} formed from ${ungrouped.length} student(s)${how}.` };
}
