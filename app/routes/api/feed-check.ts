import type { Route } from "./+types/feed-check";
import { requireCourseStaff } from "~/.server/guards.server";
import { readJson } from "~/.server/body.server";
import { checkFeedRequest } from "~/.server/planning/feed-check.server";

/**
 * The designer's live check: POST a course's reaction system, the session's numbers and the
 * benches as JSON; get each bench's prediction and warnings, and every problem with its path.
 * Staff only (the answer holds k at each temperature).
 */
export async function action({ request }: Route.ActionArgs) {
  const user = await requireCourseStaff(request, { api: true });
  if (request.method !== "POST") return Response.json({ errors: [{ path: "", message: "Use POST with a JSON body." }] }, { status: 405 });
  const origin = request.headers.get("origin");
  if (origin && origin !== new URL(request.url).origin) return Response.json({ error: "Cross-site requests are refused." }, { status: 403 });
  const body = await readJson(request);
  const result = await checkFeedRequest(user, body);
  return Response.json(result.body, { status: result.status });
}

export function loader() {
  return Response.json({ errors: [{ path: "", message: "Use POST with a JSON body." }] }, { status: 405 });
}
