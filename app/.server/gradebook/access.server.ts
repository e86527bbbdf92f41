// Who may read a gradebook: the course's instructors and demonstrators (and admins). Students
// never: 403 for a course they are in, as for any staff-only page.
import { data } from "react-router";
import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize.server";
import type { User } from "../db/models.server";
import { requireSessionStaff } from "../submissions/context.server";

function deny(status: 403 | 404, message: string, api: boolean): never {
  if (api) throw Response.json({ error: message }, { status });
  throw data({ message }, { status });
}

/** The course id when the caller may read its gradebook. */
export async function requireCourseGradebook(user: User, courseId: number | null, api: boolean): Promise<number> {
  return (await requireCourseGradebookAt(user, courseId, api)).courseId;
}

/**
 * The same check, with the course's gradebook version read in the same query (the API path is
 * benchmarked at hundreds of requests a second: one round trip fewer).
 */
export async function requireCourseGradebookAt(user: User, courseId: number | null, api: boolean): Promise<{ courseId: number; version: string }> {
  if (courseId === null) deny(404, "There is no course with this id.", api);
  const [row] = await getSequelize().query<{ id: number; role: string | null; version: string }>(
    `select c.id, cm.role, coalesce(gv.version, 0)::text as version
       from courses c
       left join course_memberships cm on cm.course_id = c.id and cm.user_id = $2
       left join gradebook_versions gv on gv.course_id = c.id
      where c.id = $1`,
    { bind: [courseId, user.id], type: QueryTypes.SELECT },
  );
  if (!row) deny(404, "There is no course with this id.", api);
  const ok = { courseId: row.id, version: row.version };
  if (user.role === "admin") return ok;
  if (!row.role) deny(403, "You are not a member of this course.", api);
  if (row.role !== "instructor" && row.role !== "demonstrator") deny(403, "Gradebooks are for the course's instructors and demonstrators.", api);
  return ok;
}

/** A practical's gradebook check in one query, with its course's gradebook version (the API path). */
export async function requireSessionGradebookAt(user: User, sessionId: number, api: boolean): Promise<{ sessionId: number; courseId: number; version: string }> {
  const [row] = await getSequelize().query<{ course_id: number; role: string | null; version: string }>(
    `select ls.course_id, cm.role, coalesce(gv.version, 0)::text as version
       from lab_sessions ls
       left join course_memberships cm on cm.course_id = ls.course_id and cm.user_id = $2
       left join gradebook_versions gv on gv.course_id = ls.course_id
      where ls.id = $1`,
    { bind: [sessionId, user.id], type: QueryTypes.SELECT },
  );
  if (!row) deny(404, "There is no such practical.", api);
  const ok = { sessionId, courseId: row.course_id, version: row.version };
  if (user.role === "admin") return ok;
  if (!row.role) deny(403, "You are not a member of this course.", api);
  if (row.role !== "instructor" && row.role !== "demonstrator") deny(403, "Gradebooks are for the course's instructors and demonstrators.", api);
  return ok;
}

export function requireSessionGradebook(user: User, sessionId: number, api: boolean) {
  return requireSessionStaff(user, sessionId, api);
}

export interface QueryProblem {
  path: string;
  message: string;
}

/** 400 with the reasons, in the API's error shape. */
export function badQuery(errors: QueryProblem[]): never {
  throw Response.json({ errors }, { status: 400 });
}
