// Marks one submitted version (see app/.server/submissions/marking.server.ts). Database errors
// throw, and graphile-worker retries; engine refusals are stored on the submission instead.
import { z } from "zod";
import { defineTask } from "../define-task.server";
import { markSubmission } from "../../submissions/marking.server";
import { Submission } from "../../db/submissions.server";
import { LabSession } from "../../db/lab-sessions.server";
import { queueScoresToPlatform } from "../../lti/grades.server";

const payload = z.object({ submissionId: z.number().int().positive() });
export type MarkSubmissionPayload = z.infer<typeof payload>;

declare module "../queue.server" {
  interface TaskPayloads {
    "mark-submission": MarkSubmissionPayload;
  }
}

export const markSubmissionTask = defineTask("mark-submission", payload, async ({ submissionId }) => {
  await markSubmission(submissionId);
  // A version marked after release (re-marking, a late upload) changes what the platform should hold.
  const submission = await Submission.findByPk(submissionId, { attributes: ["id", "sessionId"] });
  const session = submission ? await LabSession.findByPk(submission.sessionId, { attributes: ["id", "courseId"] }) : null;
  if (session) await queueScoresToPlatform(session);
});
