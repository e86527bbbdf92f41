// Sends one e-mail from a template (app/.server/mail/templates.server.ts). The address is checked
// with the forms' own function; a mail that can never be sent (bad address, unknown template,
// data that do not fit) fails permanently and stays visible as a failed job. SMTP errors throw,
// and graphile-worker retries with backoff.
import { z } from "zod";
import { emailProblem } from "~/lib/email-address";
import { sendMail } from "../../mail.server";
import { renderMail } from "../../mail/templates.server";
import { defineTask, PermanentJobError } from "../define-task.server";

const payload = z.union([
  z.object({ to: z.string(), template: z.string(), data: z.record(z.string(), z.unknown()) }),
  // Jobs queued before templates (subject and body made by the caller).
  z.object({ to: z.string(), subject: z.string().min(1), text: z.string() }),
]);
export type SendMailPayload = z.infer<typeof payload>;

declare module "../queue.server" {
  interface TaskPayloads {
    "send-mail": SendMailPayload;
  }
}

export const sendMailTask = defineTask("send-mail", payload, async (mail) => {
  const bad = emailProblem(mail.to, "the recipient's");
  if (bad) throw new PermanentJobError(`not sent to ${JSON.stringify(mail.to)}: ${bad}`);
  if ("template" in mail) {
    const rendered = renderMail(mail.template, mail.data);
    if (!rendered.ok) throw new PermanentJobError(`not sent to ${mail.to}: ${rendered.message}`);
    await sendMail({ to: mail.to, subject: rendered.subject, text: rendered.text });
  } else {
    await sendMail({ to: mail.to, subject: mail.subject, text: mail.text });
  }
});
