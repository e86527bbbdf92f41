// POST /api/groups/:groupId/submissions/preview: the same multipart body as an upload; parses and
// fits without storing anything, for the live preview on the upload page. No reference value in it.
import type { Route } from "./+types/submission-preview";
import { currentPrincipal, requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { practicalFor, requireGroup } from "~/.server/submissions/context.server";
import { readUpload } from "~/.server/submissions/upload.server";
import { previewUpload } from "~/.server/submissions/service.server";
import { requireSameOriginWrite } from "~/.server/same-origin.server";
import { requireWithinLimit } from "~/.server/throttle.server";

export async function action({ request, params }: Route.ActionArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    requireSameOriginWrite(request, await currentPrincipal(request));
    await requireWithinLimit("preview", `user:${user.id}`);
    const groupId = parseId(params.groupId);
    if (groupId === null) return Response.json({ error: "There is no such group." }, { status: 404 });
    await requireGroup(user, groupId, true);
    const { file, fields } = await readUpload(request, true);
    const sessionId = parseId(fields.sessionId ?? "");
    const practical = await practicalFor(groupId, sessionId);
    if (!practical) return Response.json({ errors: [{ path: "", message: "This group has no bench in a practical yet." }] }, { status: 409 });
    return Response.json(await previewUpload(practical, file, fields, true));
  });
}

export function loader() {
  return Response.json({ errors: [{ path: "", message: "Use POST with multipart/form-data." }] }, { status: 405 });
}
