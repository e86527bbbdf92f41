// GET /api/courses/:courseId/gradebook: a row per student, each practical's mark and the total (staff only).
import type { Route } from "./+types/course-gradebook";
import { requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { requireCourseGradebook } from "~/.server/gradebook/access.server";
import { courseSessionFilter } from "~/.server/gradebook/filters.server";
import { courseGradebook, onlySessions } from "~/.server/gradebook/course.server";
import { cachedJson } from "~/.server/gradebook/cache.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    const { courseId: id, version } = await requireCourseGradebook(user, parseId(params.courseId), true);
    const book = (await courseGradebook(id, version))!;
    const only = courseSessionFilter(new URL(request.url), book.sessions.map((s) => s.id));
    if (only) return Response.json(onlySessions(book, only));
    return new Response(cachedJson(`course:${id}`, book), { headers: { "Content-Type": "application/json" } });
  });
}
