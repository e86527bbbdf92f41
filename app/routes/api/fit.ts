import type { Route } from "./+types/fit";
import { requireUser } from "~/.server/guards.server";
import { runFit, validateFitRequest } from "~/lib/kinetics";

const MAX_BODY_BYTES = 8 * 1024 * 1024;

/**
 * POST a fit request as JSON (the same contract as `npm run fit`); staff only.
 * 200 with the fit result, 400 with { errors: [{ path, message }] } listing every problem.
 */
export async function action({ request }: Route.ActionArgs) {
  await requireUser(request, { roles: ["admin", "instructor", "demonstrator"], api: true });
  if (request.method !== "POST") return Response.json({ errors: [{ path: "", message: "Use POST with a JSON body." }] }, { status: 405 });
  const length = Number(request.headers.get("content-length") ?? 0);
  if (length > MAX_BODY_BYTES) {
    return Response.json({ errors: [{ path: "", message: `The request is ${length} bytes; the limit is ${MAX_BODY_BYTES}.` }] }, { status: 413 });
  }
  let body: unknown;
  try {
    body = JSON.parse(await request.text());
  } catch (error) {
    return Response.json({ errors: [{ path: "", message: `The body is not valid JSON: ${(error as Error).message}` }] }, { status: 400 });
  }
  const checked = validateFitRequest(body);
  if (!checked.ok) return Response.json({ errors: checked.errors }, { status: 400 });
  return Response.json(runFit(checked.request));
}

export function loader() {
  return Response.json({ errors: [{ path: "", message: "Use POST with a JSON fit request." }] }, { status: 405 });
}
