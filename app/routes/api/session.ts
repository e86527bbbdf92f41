import type { Route } from "./+types/session";
import { requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { sessionAccess, sessionView } from "~/.server/planning/sessions.server";

/** One practical: staff get the reference and every bench; a student only their group's bench. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request, { api: true });
  const id = parseId(params.sessionId);
  if (id === null) return Response.json({ error: "There is no practical with this id." }, { status: 404 });
  const access = await sessionAccess(user, id, true);
  return Response.json(await sessionView(access));
}
