import type { Route } from "./+types/fit";
import { requireCourseStaff } from "~/.server/guards.server";
import { runRequest, validateRequest } from "~/lib/kinetics";
import { readJson } from "~/.server/body.server";

/**
 * POST a fit request, or a pooled Arrhenius request { arrhenius: { benches } }, as JSON (the same
 * contract as `npm run fit`); staff only.
 * 200 with the fit result, 400 with { errors: [{ path, message }] } listing every problem.
 */
export async function action({ request }: Route.ActionArgs) {
  await requireCourseStaff(request, { api: true });
  if (request.method !== "POST") return Response.json({ errors: [{ path: "", message: "Use POST with a JSON body." }] }, { status: 405 });
  // Counted while it streams in: 413 as soon as the body passes the JSON limit, chunked or not.
  const body = await readJson(request);
  const checked = validateRequest(body);
  if (!checked.ok) return Response.json({ errors: checked.errors }, { status: 400 });
  return Response.json(runRequest(checked.value));
}

export function loader() {
  return Response.json({ errors: [{ path: "", message: "Use POST with a JSON fit request." }] }, { status: 405 });
}
