import type { Route } from "./+types/class-results";
import { requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { classResultsAccess, classResultsView } from "~/.server/class-results/service.server";

/** A practical's class results (pooled Arrhenius fit, benches against the reference): staff only. */
export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    const id = parseId(params.sessionId);
    if (id === null) return Response.json({ error: "There is no practical with this id." }, { status: 404 });
    return Response.json(await classResultsView(await classResultsAccess(user, id, true)));
  });
}
