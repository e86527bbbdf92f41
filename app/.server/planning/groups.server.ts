// Groups of a course: who is in which, and the caller's own groups with their benches.
import { sequelize, type User } from "../db/models.server";
import { QueryTypes } from "sequelize";

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
