// GET /api/submissions/:submissionId/original: the uploaded bytes exactly as stored, with their
// content type and file name (and the SHA-256 in a header, to check them against).
import type { Route } from "./+types/submission-original";
import { requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { loadSubmission } from "~/.server/submissions/access.server";
import { SubmissionFile } from "~/.server/db/submissions.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    const id = parseId(params.submissionId);
    if (id === null) return Response.json({ error: "There is no such submission." }, { status: 404 });
    await loadSubmission(user, id, true);
    const file = await SubmissionFile.findByPk(id);
    if (!file) return Response.json({ error: "This submission has no stored file." }, { status: 404 });
    const ascii = file.originalName.replace(/[^\x20-\x7e]/g, "_").replace(/["\\]/g, "_");
    return new Response(new Uint8Array(file.bytes), {
      headers: {
        "Content-Type": file.contentType,
        "Content-Length": String(file.size),
        "Content-Disposition": `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(file.originalName)}`,
        "X-Content-SHA256": file.sha256,
        "X-Content-Type-Options": "nosniff",
        "Cache-Control": "private, no-store",
      },
    });
  });
}
