// A password reset request (people.server.ts requestPasswordReset): the request only adds this
// job, whatever the address; here the account is looked up and, when there is one, a link is
// made and its mail queued through send-mail.
import { z } from "zod";
import { defineTask } from "../define-task.server";
import { sendPasswordResetLink } from "../../people.server";

const payload = z.object({ email: z.string().min(1).max(254) });
export type PasswordResetPayload = z.infer<typeof payload>;

declare module "../queue.server" {
  interface TaskPayloads {
    "password-reset": PasswordResetPayload;
  }
}

export const passwordResetTask = defineTask("password-reset", payload, async ({ email }) => {
  await sendPasswordResetLink(email);
});
