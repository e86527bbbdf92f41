// Posts a practical's waiting scores to the learning platforms (app/.server/lti/grades.server.ts).
// A failure throws, so graphile-worker retries with its backoff; on the last attempt the scores
// are shown to the instructor as failed, with the platform's answer.
import { z } from "zod";
import { defineTask } from "../define-task.server";
import { sendWaitingScores } from "../../lti/grades.server";

const payload = z.object({ sessionId: z.number().int().positive() });
export type LtiSendScoresPayload = z.infer<typeof payload>;

declare module "../queue.server" {
  interface TaskPayloads {
    "lti-send-scores": LtiSendScoresPayload;
  }
}

export const ltiSendScoresTask = defineTask("lti-send-scores", payload, async ({ sessionId }, helpers) => {
  await sendWaitingScores(sessionId, { number: helpers.job.attempts, last: helpers.job.attempts >= helpers.job.max_attempts });
});
