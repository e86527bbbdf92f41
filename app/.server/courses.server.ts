import { fn, col, QueryTypes } from "sequelize";
import { Course, CourseMembership, User, sequelize, type CourseRole } from "./db/models.server";
import { recordAudit } from "./audit.server";
import { Group, GroupMember } from "./db/groups.server";
import type { FieldErrors, Outcome } from "./people.server";
import { isTimeZone } from "~/lib/time-zone";

export interface CourseSummary {
  id: number;
  code: string;
  title: string;
  term: string;
  archived: boolean;
  /** the person's own role in the course; null for an admin who is not a member */
  myRole: CourseRole | null;
  memberCounts: Record<CourseRole, number>;
}

/** The courses a person can open, with member counts per role (admins see all). */
export async function coursesFor(user: User): Promise<CourseSummary[]> {
  const memberships = await CourseMembership.findAll({
    where: { userId: user.id },
    include: [{ model: Course, as: "course" }],
  });
  const own = new Map(memberships.map((m) => [m.courseId as number, m.role]));
  const list =
    user.role === "admin"
      ? await Course.findAll({ order: [["code", "ASC"], ["term", "ASC"]] })
      : memberships.map((m) => m.course!).sort((a, b) => a.code.localeCompare(b.code) || a.term.localeCompare(b.term));
  if (!list.length) return [];
  const counts = (await CourseMembership.findAll({
    attributes: ["courseId", "role", [fn("count", col("id")), "n"]],
    where: { courseId: list.map((c) => c.id) },
    group: ["courseId", "role"],
    raw: true,
  })) as unknown as Array<{ courseId: number; role: CourseRole; n: string }>;
  return list.map((c) => {
    const memberCounts = { instructor: 0, demonstrator: 0, student: 0 };
    for (const row of counts) if (row.courseId === c.id) memberCounts[row.role] = Number(row.n);
    return { id: c.id, code: c.code, title: c.title, term: c.term, archived: c.archivedAt !== null, myRole: own.get(c.id) ?? null, memberCounts };
  });
}

export interface CourseRoleRow {
  id: number;
  code: string;
  title: string;
  role: CourseRole;
}

/**
 * The caller's courses and role in each, in one plain query: it runs on every `GET /api/me`,
 * where the ORM's include and per-role counts cost several times the query itself
 * (scripts/bench/api-me-bench.ts).
 */
export async function courseRolesFor(user: Pick<User, "id" | "role">): Promise<CourseRoleRow[]> {
  // Admins see every course; in one they do not belong to they act as its instructor (as /api/courses says).
  if (user.role === "admin") {
    return sequelize.query<CourseRoleRow>(
      "select c.id, c.code, c.title, coalesce(m.role, 'instructor') as role from courses c" +
        " left join course_memberships m on m.course_id = c.id and m.user_id = $1 order by c.code, c.term",
      { bind: [user.id], type: QueryTypes.SELECT },
    );
  }
  return sequelize.query<CourseRoleRow>(
    "select c.id, c.code, c.title, m.role from course_memberships m join courses c on c.id = m.course_id where m.user_id = $1 order by c.code, c.term",
    { bind: [user.id], type: QueryTypes.SELECT },
  );
}

/** Members by name (not by role, so a row stays where it was when its role changes). */
export async function courseMembers(courseId: number) {
  const members = await CourseMembership.findAll({
    where: { courseId },
    include: [{ model: User, as: "user", attributes: ["id", "email", "displayName", "passwordHash"] }],
  });
  return members.sort((a, b) => a.user!.displayName.localeCompare(b.user!.displayName) || a.id - b.id);
}

export async function createCourse(actor: User, input: { code: unknown; title: unknown; term: unknown }): Promise<Outcome<Course>> {
  const code = String(input.code ?? "").trim().toUpperCase();
  const title = String(input.title ?? "").trim();
  const term = String(input.term ?? "").trim();
  const errors: FieldErrors = {};
  if (!code) errors.code = "Enter a short course code.";
  else if (!/^[A-Z0-9][A-Z0-9 _-]{0,39}$/.test(code)) errors.code = "Use up to 40 letters, digits, spaces, - or _.";
  if (!title) errors.title = "Enter the course title.";
  else if (title.length > 200) errors.title = "Use at most 200 characters.";
  if (term.length > 60) errors.term = "Use at most 60 characters.";
  if (!errors.code && (await Course.findOne({ where: { code, term } }))) {
    errors.code = term ? `A course with the code ${code} exists already in ${term}.` : `A course with the code ${code} and no term exists already; give the term.`;
  }
  if (Object.keys(errors).length) return { ok: false, errors };
  const course = await sequelize.transaction(async (transaction) => {
    const c = await Course.create({ code, title, term }, { transaction });
    await CourseMembership.create({ courseId: c.id, userId: actor.id, role: "instructor" }, { transaction });
    await recordAudit({ actorId: actor.id, action: "course.created", entityType: "course", entityId: c.id, after: { code, title, term } }, transaction);
    return c;
  });
  return { ok: true, value: course };
}

/** Instructor (or admin): the course's clock, in which deadlines are entered and shown; audited. Stored deadlines keep their moment. */
export async function setCourseTimeZone(actor: User, courseId: number, zone: unknown): Promise<Outcome> {
  if (!isTimeZone(zone)) return { ok: false, errors: { timeZone: "Choose a time zone from the list (e.g. Europe/Berlin)." } };
  return sequelize.transaction(async (transaction) => {
    const course = await Course.findByPk(courseId, { transaction, lock: true });
    if (!course) return { ok: false as const, errors: { form: "That course no longer exists." } };
    if (course.timeZone === zone) return { ok: true as const, value: undefined };
    const before = { timeZone: course.timeZone };
    await course.update({ timeZone: zone }, { transaction });
    await recordAudit({ actorId: actor.id, action: "course.time-zone-changed", entityType: "course", entityId: course.id, before, after: { timeZone: zone } }, transaction);
    return { ok: true as const, value: undefined };
  });
}

/** Instructor (or admin): archives a course, or takes it out of the archive; audited. */
export async function setCourseArchived(actor: User, courseId: number, archived: boolean): Promise<Outcome> {
  return sequelize.transaction(async (transaction) => {
    const course = await Course.findByPk(courseId, { transaction, lock: true });
    if (!course) return { ok: false as const, errors: { form: "That course no longer exists." } };
    if ((course.archivedAt !== null) === archived) return { ok: true as const, value: undefined };
    const before = { archived: course.archivedAt !== null };
    await course.update({ archivedAt: archived ? new Date() : null }, { transaction });
    await recordAudit({ actorId: actor.id, action: archived ? "course.archived" : "course.unarchived", entityType: "course", entityId: course.id, before, after: { archived } }, transaction);
    return { ok: true as const, value: undefined };
  });
}

/** Instructor (or admin): takes a person off a course; a course keeps at least one instructor. */
export async function removeMember(actor: User, courseId: number, membershipId: number): Promise<Outcome<{ name: string }>> {
  return sequelize.transaction(async (transaction) => {
    const m = await CourseMembership.findOne({ where: { id: membershipId, courseId }, include: [{ model: User, as: "user" }], transaction });
    if (!m) return { ok: false as const, errors: { form: "That person is no longer in this course." } };
    if (m.role === "instructor" && (await CourseMembership.count({ where: { courseId, role: "instructor" }, transaction })) <= 1) {
      return { ok: false as const, errors: { form: "A course needs at least one instructor; add another before removing this one." } };
    }
    const before = { courseId, userId: m.userId, email: m.user!.email, role: m.role };
    // Taken off the course means out of its group too: no reading or uploading for it afterwards.
    const inGroup = await GroupMember.findOne({ where: { courseId, userId: m.userId }, include: [{ model: Group, as: "group" }], transaction });
    if (inGroup) {
      await inGroup.destroy({ transaction });
      await recordAudit({ actorId: actor.id, action: "group.member-removed", entityType: "group", entityId: inGroup.groupId, before: { userId: m.userId, email: m.user!.email, group: inGroup.group?.name ?? null, reason: "taken off the course" } }, transaction);
    }
    await m.destroy({ transaction });
    await recordAudit({ actorId: actor.id, action: "membership.removed", entityType: "course_membership", entityId: membershipId, before: { ...before, group: inGroup?.group?.name ?? null } }, transaction);
    return { ok: true as const, value: { name: m.user!.displayName } };
  });
}
