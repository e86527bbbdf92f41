import { fn, col, QueryTypes } from "sequelize";
import { Course, CourseMembership, User, sequelize, type CourseRole } from "./db/models.server";
import { recordAudit } from "./audit.server";
import type { FieldErrors, Outcome } from "./people.server";

export interface CourseSummary {
  id: number;
  code: string;
  title: string;
  term: string;
  myRole: CourseRole;
  memberCounts: Record<CourseRole, number>;
}

/** The courses a person can open, with member counts per role (admins see all). */
export async function coursesFor(user: User): Promise<CourseSummary[]> {
  const courses =
    user.role === "admin"
      ? (await Course.findAll({ order: [["code", "ASC"]] })).map((c) => ({ c, role: "instructor" as CourseRole }))
      : (
          await CourseMembership.findAll({
            where: { userId: user.id },
            include: [{ model: Course, as: "course" }],
            order: [[{ model: Course, as: "course" }, "code", "ASC"]],
          })
        ).map((m) => ({ c: m.course!, role: m.role }));
  if (!courses.length) return [];
  const counts = (await CourseMembership.findAll({
    attributes: ["courseId", "role", [fn("count", col("id")), "n"]],
    where: { courseId: courses.map((x) => x.c.id) },
    group: ["courseId", "role"],
    raw: true,
  })) as unknown as Array<{ courseId: number; role: CourseRole; n: string }>;
  return courses.map(({ c, role }) => {
    const memberCounts = { instructor: 0, demonstrator: 0, student: 0 };
    for (const row of counts) if (row.courseId === c.id) memberCounts[row.role] = Number(row.n);
    return { id: c.id, code: c.code, title: c.title, term: c.term, myRole: role, memberCounts };
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
  if (user.role === "admin") {
    return sequelize.query<CourseRoleRow>("select id, code, title, 'instructor' as role from courses order by code", { type: QueryTypes.SELECT });
  }
  return sequelize.query<CourseRoleRow>(
    "select c.id, c.code, c.title, m.role from course_memberships m join courses c on c.id = m.course_id where m.user_id = $1 order by c.code",
    { bind: [user.id], type: QueryTypes.SELECT },
  );
}

const ROLE_ORDER: Record<CourseRole, number> = { instructor: 0, demonstrator: 1, student: 2 };

/** Members, staff first, then by name. */
export async function courseMembers(courseId: number) {
  const members = await CourseMembership.findAll({
    where: { courseId },
    include: [{ model: User, as: "user", attributes: ["id", "email", "displayName", "passwordHash"] }],
  });
  return members.sort(
    (a, b) => ROLE_ORDER[a.role] - ROLE_ORDER[b.role] || a.user!.displayName.localeCompare(b.user!.displayName),
  );
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
  if (!errors.code && (await Course.findOne({ where: { code } }))) errors.code = `A course with the code ${code} exists already.`;
  if (Object.keys(errors).length) return { ok: false, errors };
  const course = await sequelize.transaction(async (transaction) => {
    const c = await Course.create({ code, title, term }, { transaction });
    await CourseMembership.create({ courseId: c.id, userId: actor.id, role: "instructor" }, { transaction });
    await recordAudit({ actorId: actor.id, action: "course.created", entityType: "course", entityId: c.id, after: { code, title, term } }, transaction);
    return c;
  });
  return { ok: true, value: course };
}
