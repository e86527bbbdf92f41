// Every task the workers know. To add one: write app/.server/jobs/tasks/<name>.server.ts with
// defineTask(), and add it to this list.
import type { TaskList } from "graphile-worker";
import type { TaskDefinition } from "./define-task.server";
import { sendMailTask } from "./tasks/send-mail.server";
import { markSubmissionTask } from "./tasks/mark-submission.server";
import { passwordResetTask } from "./tasks/password-reset.server";
import { ltiSendScoresTask } from "./tasks/lti-send-scores.server";

const definitions: TaskDefinition[] = [sendMailTask, markSubmissionTask, passwordResetTask, ltiSendScoresTask];

export const taskList: TaskList = Object.fromEntries(definitions.map((d) => [d.name, d.run]));
