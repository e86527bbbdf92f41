// POST /api/groups/:groupId/submissions: a group's readings file (multipart), stored as the next
// version and queued for marking. GET lists the group's versions (newest first).
import type { Route } from "./+types/group-submissions";
import { currentPrincipal, requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { requireGroup } from "~/.server/submissions/context.server";
import { readUpload } from "~/.server/submissions/upload.server";
import { createSubmission } from "~/.server/submissions/service.server";
import { requireSameOriginWrite } from "~/.server/same-origin.server";
import { groupSubmissions } from "~/.server/submissions/list.server";

function groupIdOf(params: { groupId?: string }): number {
  const id = parseId(params.groupId);
  if (id === null) throw Response.json({ error: "There is no such group." }, { status: 404 });
  return id;
}

export async function action({ request, params }: Route.ActionArgs) {
  return whileDatabaseUp(true, async () => {
    if (request.method !== "POST") return Response.json({ errors: [{ path: "", message: "Use POST with multipart/form-data." }] }, { status: 405 });
    const user = await requireUser(request, { api: true });
    requireSameOriginWrite(request, await currentPrincipal(request));
    const groupId = groupIdOf(params);
    await requireGroup(user, groupId, true);
    const { file, fields } = await readUpload(request, true);
    const created = await createSubmission(user, groupId, file, fields, true);
    if (created.status === "refused") {
      return Response.json({ id: created.id, version: created.version, status: created.status, late: created.late, problems: created.problems, errors: [{ path: "file", message: created.message }] }, { status: 422 });
    }
    return Response.json(
      { id: created.id, version: created.version, status: created.status, late: created.late, problems: created.problems },
      { status: 202, headers: { Location: `/api/submissions/${created.id}` } },
    );
  });
}

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    const groupId = groupIdOf(params);
    const { viewer } = await requireGroup(user, groupId, true);
    return Response.json({ submissions: await groupSubmissions(groupId, viewer) });
  });
}
