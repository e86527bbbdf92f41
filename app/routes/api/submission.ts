// GET /api/submissions/:submissionId: one version, as its viewer may see it (see view.server.ts).
import type { Route } from "./+types/submission";
import { requireUser } from "~/.server/guards.server";
import { parseId } from "~/.server/ids.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { loadSubmission } from "~/.server/submissions/access.server";
import { releaseInfo } from "~/.server/submissions/review.server";
import { submissionView } from "~/.server/submissions/view.server";
import { SubmissionFile } from "~/.server/db/submissions.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    const id = parseId(params.submissionId);
    if (id === null) return Response.json({ error: "There is no such submission." }, { status: 404 });
    const { submission, viewer } = await loadSubmission(user, id, true);
    const file = await SubmissionFile.findByPk(id, { attributes: ["originalName"] });
    return Response.json(submissionView(submission, viewer, await releaseInfo(submission.sessionId), file?.originalName ?? null));
  });
}
