import type { Route } from "./+types/fit";
import { currentPrincipal, requireCourseStaff } from "~/.server/guards.server";
import { requireSameOriginWrite } from "~/.server/same-origin.server";
import { requireWithinLimit } from "~/.server/throttle.server";
import { validateRequest } from "~/lib/kinetics";
import { compute } from "~/.server/compute/pool.server";
import { readJson } from "~/.server/body.server";

/**
 * POST a fit request, or a pooled Arrhenius request { arrhenius: { benches } }, as JSON (the same
 * contract as `npm run fit`); staff only.
 * 200 with the fit result, 400 with { errors: [{ path, message }] } listing every problem.
 */
export async function action({ request }: Route.ActionArgs) {
  const user = await requireCourseStaff(request, { api: true });
  if (request.method !== "POST") return Response.json({ errors: [{ path: "", message: "Use POST with a JSON body." }] }, { status: 405 });
  // A resource route: the framework's origin check of page actions does not cover it.
  requireSameOriginWrite(request, await currentPrincipal(request));
  await requireWithinLimit("fit", `user:${user.id}`);
  // Counted while it streams in: 413 as soon as the body passes the JSON limit, chunked or not.
  const body = await readJson(request);
  const checked = validateRequest(body);
  if (!checked.ok) return Response.json({ errors: checked.errors }, { status: 400 });
  // the fit runs in the compute pool, off the request thread
  return Response.json(await compute("fit", checked.value));
}

export function loader() {
  return Response.json({ errors: [{ path: "", message: "Use POST with a JSON fit request." }] }, { status: 405 });
}
