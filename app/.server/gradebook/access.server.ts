// Who may read a gradebook: the course's instructors and demonstrators (and admins). Students
// never: 403 for a course they are in, as for any staff-only page.
import { refuseWriteIfArchived } from "../guards.server";
import { data } from "react-router";
import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import type { User } from "../db/models.server";

function deny(status: 403 | 404, message: string, api: boolean): never {
  if (api) throw Response.json({ error: message }, { status });
  throw data({ message }, { status });
}

export interface GradebookAt {
  courseId: number;
  /** the course's gradebook version, read in the same query (pass it on to the gradebook) */
  version: string;
  /** an instructor of the course, or an admin (who acts as one): may change settings and exclusions */
  instructor: boolean;
  /** the course is archived (read-only) */
  archived: boolean;
}

// The course, the caller's role in it and the course's gradebook version, from a course id or a
// practical id: one query, as the gradebook API answers hundreds of requests a second.
const ACCESS = {
  course: `select c.id as course_id, cm.role, c.archived_at is not null as archived, coalesce(gv.version, 0)::text as version
             from courses c
             left join course_memberships cm on cm.course_id = c.id and cm.user_id = $2
             left join gradebook_versions gv on gv.course_id = c.id
            where c.id = $1`,
  session: `select ls.course_id, cm.role, c.archived_at is not null as archived, coalesce(gv.version, 0)::text as version
              from lab_sessions ls
              join courses c on c.id = ls.course_id
              left join course_memberships cm on cm.course_id = ls.course_id and cm.user_id = $2
              left join gradebook_versions gv on gv.course_id = ls.course_id
             where ls.id = $1`,
};

async function requireGradebookStaff(user: User, kind: keyof typeof ACCESS, id: number | null, notFound: string, api: boolean): Promise<GradebookAt> {
  if (id === null) deny(404, notFound, api);
  const [row] = await getSequelize().query<{ course_id: number; role: string | null; archived: boolean; version: string }>(ACCESS[kind], {
    bind: [id, user.id],
    type: QueryTypes.SELECT,
  });
  if (!row) deny(404, notFound, api);
  if (user.role !== "admin") {
    if (!row.role) deny(403, "You are not a member of this course.", api);
    if (row.role !== "instructor" && row.role !== "demonstrator") deny(403, "Gradebooks are for the course's instructors and demonstrators.", api);
  }
  if (row.archived) await refuseWriteIfArchived(user, row.course_id, api);
  return { courseId: row.course_id, version: row.version, instructor: user.role === "admin" || row.role === "instructor", archived: row.archived };
}

/** The caller may read the course's gradebook (its instructors and demonstrators, admins), or 403/404. */
export function requireCourseGradebook(user: User, courseId: number | null, api: boolean): Promise<GradebookAt> {
  return requireGradebookStaff(user, "course", courseId, "There is no course with this id.", api);
}

/** The caller may read the practical's gradebook, or 403/404. */
export function requireSessionGradebook(user: User, sessionId: number | null, api: boolean): Promise<GradebookAt> {
  return requireGradebookStaff(user, "session", sessionId, "There is no such practical.", api);
}

export interface QueryProblem {
  path: string;
  message: string;
}

/** 400 with the reasons, in the API's error shape. */
export function badQuery(errors: QueryProblem[]): never {
  throw Response.json({ errors }, { status: 400 });
}
