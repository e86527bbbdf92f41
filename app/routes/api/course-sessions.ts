import type { Route } from "./+types/course-sessions";
import { requireCourseRole, requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { courseSessions } from "~/.server/planning/sessions.server";
import { Course } from "~/.server/db/models.server";

/** The practicals of a course, for its members. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request, { api: true });
  const id = parseId(params.courseId);
  const course = id === null ? null : await Course.findByPk(id);
  if (!course) return Response.json({ error: "There is no course with this id." }, { status: 404 });
  await requireCourseRole(user, course.id, ["instructor", "demonstrator", "student"], true);
  return Response.json(await courseSessions(course.id));
}
