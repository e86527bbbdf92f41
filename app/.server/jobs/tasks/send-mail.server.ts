// Sends one e-mail. Failures (SMTP down) throw, and graphile-worker retries with backoff.
import { z } from "zod";
import { sendMail } from "../../mail.server";
import { defineTask } from "../define-task.server";

const payload = z.object({ to: z.email(), subject: z.string().min(1), text: z.string() });
export type SendMailPayload = z.infer<typeof payload>;

declare module "../queue.server" {
  interface TaskPayloads {
    "send-mail": SendMailPayload;
  }
}

export const sendMailTask = defineTask("send-mail", payload, async (mail) => {
  await sendMail(mail);
});
