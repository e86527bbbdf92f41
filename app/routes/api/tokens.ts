import type { Route } from "./+types/tokens";
import { currentPrincipal, requireUser } from "~/.server/guards.server";
import { checkTokenRequest, createApiToken, TokenCapError } from "~/.server/api-tokens.server";
import { readJson } from "~/.server/body.server";
import { requireSameOriginWrite } from "~/.server/same-origin.server";
import { requireWithinLimit } from "~/.server/throttle.server";

/**
 * POST { name, expiresInDays? } -> 201 { id, token, name, expiresAt }. Signed in with the session
 * cookie only: a token cannot make more tokens. The token is in this answer and nowhere else.
 */
export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, { api: true });
  if (request.method !== "POST") return Response.json({ errors: [{ path: "", message: "Use POST with { name, expiresInDays? }." }] }, { status: 405 });
  const principal = await currentPrincipal(request);
  if (principal?.via !== "session") return Response.json({ error: "Tokens are made while signed in (account page or session cookie), not with another token." }, { status: 403 });
  requireSameOriginWrite(request, principal);
  const checked = checkTokenRequest(await readJson(request, { limit: 4096 }));
  if (!checked.ok) return Response.json({ errors: checked.errors }, { status: 400 });
  await requireWithinLimit("tokenCreate", `user:${user.id}`);
  let made;
  try {
    made = await createApiToken(user, checked.name, checked.expiresInDays);
  } catch (error) {
    if (error instanceof TokenCapError) return Response.json({ errors: [{ path: "", message: error.message }] }, { status: 409 });
    throw error;
  }
  return Response.json({ id: made.id, token: made.token, name: made.name, expiresAt: made.expiresAt }, { status: 201, headers: { "Cache-Control": "no-store" } });
}

export function loader() {
  return Response.json({ errors: [{ path: "", message: "Use POST to make a token; your tokens are listed on the account page." }] }, { status: 405 });
}
