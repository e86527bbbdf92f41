// GET /api/sessions/:sessionId/gradebook: a row per group at a bench (staff only).
import type { Route } from "./+types/session-gradebook";
import { requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { requireSessionGradebook } from "~/.server/gradebook/access.server";
import { sessionRowFilter } from "~/.server/gradebook/filters.server";
import { sessionGradebook } from "~/.server/gradebook/session.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    const id = parseId(params.sessionId);
    if (id === null) return Response.json({ error: "There is no practical with this id." }, { status: 404 });
    await requireSessionGradebook(user, id, true);
    const keep = sessionRowFilter(new URL(request.url));
    const book = (await sessionGradebook(id))!;
    return Response.json({ ...book, rows: book.rows.filter(keep) });
  });
}
