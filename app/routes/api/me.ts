import type { Route } from "./+types/me";
import { requireUser } from "~/.server/guards.server";
import { courseRolesFor } from "~/.server/courses.server";
import { groupsOf } from "~/.server/planning/groups.server";

/** The signed-in person, their courses and their groups, as JSON (401 when signed out). */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, { api: true });
  const [courses, groups] = await Promise.all([courseRolesFor(user), groupsOf(user)]);
  return Response.json({
    user: { id: user.id, email: user.email, displayName: user.displayName, role: user.role },
    courses,
    groups,
  });
}
