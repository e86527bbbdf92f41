import type { Route } from "./+types/courses";
import { requireUser } from "~/.server/guards.server";
import { coursesFor } from "~/.server/courses.server";

/** The caller's courses (every course for an admin). */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, { api: true });
  const courses = await coursesFor(user);
  return Response.json(courses.map((c) => ({ id: c.id, code: c.code, title: c.title, role: c.myRole ?? "instructor" })));
}
