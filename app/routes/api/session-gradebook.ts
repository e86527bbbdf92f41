// GET /api/sessions/:sessionId/gradebook: a row per group at a bench (staff only).
import type { Route } from "./+types/session-gradebook";
import { requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { requireSessionGradebook } from "~/.server/gradebook/access.server";
import { sessionRowFilter } from "~/.server/gradebook/filters.server";
import { sessionGradebook } from "~/.server/gradebook/session.server";
import { cachedJson } from "~/.server/gradebook/cache.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    const id = parseId(params.sessionId);
    const { version } = await requireSessionGradebook(user, id, true);
    const url = new URL(request.url);
    const keep = sessionRowFilter(url);
    const book = (await sessionGradebook(id!, version))!;
    // No filter asked for: the kept JSON text, made once per version of the course.
    if (!url.search) return new Response(cachedJson(`session:${id}`, book), { headers: { "Content-Type": "application/json" } });
    return Response.json({ ...book, rows: book.rows.filter(keep) });
  });
}
