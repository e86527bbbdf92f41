import type { Route } from "./+types/token";
import { currentPrincipal, requireUser } from "~/.server/guards.server";
import { revokeApiToken } from "~/.server/api-tokens.server";
import { parseId } from "~/.server/ids.server";
import { requireSameOriginWrite } from "~/.server/same-origin.server";

/** DELETE: revokes one of the caller's tokens (204); it is refused from the next request on. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, { api: true });
  if (request.method !== "DELETE") return Response.json({ errors: [{ path: "", message: "Use DELETE to revoke a token." }] }, { status: 405 });
  requireSameOriginWrite(request, await currentPrincipal(request));
  const id = parseId(params.tokenId);
  // Another person's token answers as an unknown one: ids of others' tokens do not leak.
  if (id === null || !(await revokeApiToken(user.id, id))) return Response.json({ error: "You have no token with that id." }, { status: 404 });
  return new Response(null, { status: 204 });
}

export function loader() {
  return Response.json({ errors: [{ path: "", message: "Use DELETE to revoke a token." }] }, { status: 405 });
}
