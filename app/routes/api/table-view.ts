// GET /api/table-views/:tableKey: the caller's remembered view of a table (columns hidden, sort,
// filters, search); POST saves it (JSON). Cookie or Bearer; a cookie write must come from our pages.
import type { Route } from "./+types/table-view";
import { currentPrincipal, requireUser } from "~/.server/guards.server";
import { readJson } from "~/.server/body.server";
import { requireSameOriginWrite } from "~/.server/same-origin.server";
import { saveTableView, tableView } from "~/.server/gradebook/table-views.server";
import { checkTableView, tableKeyOrProblem } from "~/.server/gradebook/table-view-api.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request, { api: true });
  const key = tableKeyOrProblem(params.tableKey);
  if ("error" in key) return Response.json({ error: key.error }, { status: 404 });
  return Response.json({ view: await tableView(user.id, key.key) });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, { api: true });
  if (request.method !== "POST") return Response.json({ errors: [{ path: "", message: "Use POST with the view as JSON." }] }, { status: 405 });
  requireSameOriginWrite(request, await currentPrincipal(request));
  const key = tableKeyOrProblem(params.tableKey);
  if ("error" in key) return Response.json({ error: key.error }, { status: 404 });
  const checked = checkTableView(await readJson(request, { limit: 16 * 1024 }));
  if (!checked.ok) return Response.json({ errors: checked.errors }, { status: 400 });
  await saveTableView(user.id, key.key, checked.view);
  return Response.json({ view: checked.view });
}
